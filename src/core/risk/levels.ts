/**
 * Levels of visibility, in threshold units (margin = contrast / threshold, 1.0 = just visible
 * in a forced-choice test). The detection probability of a pattern m threshold units strong
 * follows a Weibull psychometric function P = 1 - exp(-m^3.5) (Quick 1974; slope 3.5 as in
 * Daly 1993, from memory): P = 8 % at m = 0.5, 63 % at 1, about 100 % at 2.
 * - low: every pattern below 1 threshold unit: nothing a viewer will see in passing.
 * - moderate: 1..3: faint, visible on close inspection.
 * - high: 3 or more: detected every time, from across the room (plainly visible).
 */
import type { RiskLevel } from './score.js';

export const VISIBLE_MARGIN = 1;
export const PLAIN_MARGIN = 3;

export function visibilityLevel(margin: number): RiskLevel {
  if (margin >= PLAIN_MARGIN) return 'high';
  return margin >= VISIBLE_MARGIN ? 'moderate' : 'low';
}

/**
 * Score 0..1: log10 of the margin from 0.1 (score 0, a tenth of threshold) to 100 (score 1);
 * threshold itself scores 1/3, PLAIN_MARGIN 0.49.
 */
export function visibilityScore(margin: number): number {
  if (!(margin > 0.1)) return 0;
  return Math.min(1, (Math.log10(margin) + 1) / 3);
}
