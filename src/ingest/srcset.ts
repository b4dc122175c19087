/**
 * `srcset` and `sizes` strings for the HTML `img` element.
 *
 * Syntax per the HTML Living Standard, "srcset" attribute: a comma-separated list of image
 * candidate strings, each a URL, whitespace, and a width descriptor `<integer>w`; a URL must
 * not start or end with a comma, and two candidates must not share a width descriptor.
 */

export interface SrcsetCandidate {
  url: string;
  width: number;
}

/** One `srcset` string with ascending, distinct `w` descriptors. */
export function buildSrcset(candidates: readonly SrcsetCandidate[]): string {
  const byWidth = new Map<number, string>();
  for (const c of candidates) {
    if (/^,|,$|\s/.test(c.url)) throw new RangeError(`URL not allowed in srcset: ${JSON.stringify(c.url)}`);
    if (!byWidth.has(c.width)) byWidth.set(c.width, c.url);
  }
  return [...byWidth.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([w, url]) => `${url} ${w}w`)
    .join(', ');
}

/**
 * A default `sizes` suggestion: the image spans the viewport on screens narrower than its
 * natural width and keeps its natural width (in CSS pixels) above it. Page authors who know
 * their layout should replace it; it is a safe starting point, not a measurement.
 */
export function suggestSizes(largestWidth: number): string {
  return `(max-width: ${largestWidth}px) 100vw, ${largestWidth}px`;
}
