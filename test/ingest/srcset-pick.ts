/**
 * The candidate a browser picks from a `w`-descriptor srcset, as the tests predict it.
 *
 * HTML Living Standard, "Selecting an image source" and "normalise the source densities":
 * each candidate's density is its width descriptor divided by the source size (the `sizes`
 * slot in CSS px); which density to take for a device pixel ratio is left to the user agent.
 * The rule here is the plain one: the smallest candidate whose density reaches the ratio, else
 * the densest. Measured: Chromium 156 (Debian) follows it in all nine cases of the browser
 * test. Older Chromium sources (html_srcset_parser.cc, SelectionLogic, read in Chromium-derived
 * trees) kept the smaller candidate above ratio 1 when the ratio was below the geometric mean
 * of the two densities; at 375 px and ratio 3 that would be 1080w, and Chromium 156 loads
 * 1280w. (Chromium also prefers a denser candidate already in its memory cache; a fresh
 * browser context per case keeps that out.)
 */
export function pickCandidate(widths: readonly number[], slot: number, dpr: number): number {
  const sorted = [...widths].sort((a, b) => a - b);
  return sorted.find((w) => w / slot >= dpr) ?? sorted[sorted.length - 1];
}
