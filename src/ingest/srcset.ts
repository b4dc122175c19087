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
