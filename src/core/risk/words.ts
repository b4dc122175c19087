/** Plain words for a false pattern: what a viewer sees, and how strongly. */
import type { PatternKind } from './visibility.js';

interface Described {
  kind: PatternKind;
  apparent: { fx: number; fy: number };
  margin: number;
}

/** Output pixels per cycle of a frequency (cycles/px), rounded for prose. */
export function periodPx(f: number): string {
  const p = 1 / Math.max(1e-9, Math.abs(f));
  return p >= 1000 ? 'over 1000' : p >= 10 ? p.toFixed(0) : p.toFixed(1);
}

function strength(margin: number): string {
  if (margin >= 3) return 'plainly visible';
  if (margin >= 1) return 'faint, visible on close inspection';
  return 'too faint to see';
}

export function describe(p: Described): string {
  const f = Math.hypot(p.apparent.fx, p.apparent.fy);
  if (p.kind === 'clean') return 'passes cleanly';
  if (p.kind === 'beat') {
    return `beats: the stripes swell and fade every ${periodPx(f)} px (${strength(p.margin)})`;
  }
  if (f < 1e-3) return `folds onto an even tone shift (${strength(p.margin)})`;
  return `folds into coarse bands ${periodPx(f)} px apart (${strength(p.margin)})`;
}
