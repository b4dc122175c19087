import type { VisiblePattern } from '../core/risk/visibility.js';
/**
 * A pattern of the alias-risk report, named by what it does in the copy. Pure, no DOM: tested
 * in Node.
 */

/** One pattern as GET /v1/alias-risk/{source} reports it: the core's own type (erased in the bundle). */
export type Pattern = Omit<VisiblePattern, 'source' | 'passed'> & Partial<Pick<VisiblePattern, 'source'>>;

/** Below this (cycles per output px) a pattern has no visible period left: a flat tone. */
const FLAT = 1e-3;
/** Bands at least this many output px apart read as coarse; closer ones as fine false stripes. */
const COARSE_PERIOD = 4;

/** Output pixels per cycle of the apparent pattern, one decimal. */
function every(p: Pattern): string {
  return (1 / Math.hypot(p.apparent.fx, p.apparent.fy)).toFixed(1);
}

/**
 * What the pattern does, in a shop owner's words. A pattern that folds to zero frequency
 * shifts the tone evenly: no bands, so not moiré. The broadband fold of fine detail has no
 * one period: it shows as grain and jagged edges.
 */
export function patternName(p: Pattern): string {
  if (p.kind === 'clean') return 'passes cleanly';
  const flat = Math.hypot(p.apparent.fx, p.apparent.fy) < FLAT;
  if (p.kind === 'beat') return flat ? 'beats too slowly to see a period' : `beats, swelling and fading every ${every(p)} output px`;
  if (p.source === 'broadband') return 'folds fine detail into grain and jagged edges';
  if (flat) return 'folds into an even tone shift (no bands)';
  const coarse = 1 / Math.hypot(p.apparent.fx, p.apparent.fy) >= COARSE_PERIOD;
  return `folds into ${coarse ? 'coarse bands' : 'false fine stripes'} every ${every(p)} output px`;
}
