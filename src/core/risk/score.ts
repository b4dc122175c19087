/**
 * From folded fraction to score and level. The score is the folded fraction on a decibel
 * scale, mapped linearly from FLOOR_DB (score 0) to CEIL_DB (score 1); the level thresholds
 * sit on that scale. The choice and its measurement are documented beside each constant.
 */

/** Folded energy at or below -50 dB (0.001 %) scores 0: below 8-bit quantisation noise of a full-range signal. */
export const FLOOR_DB = -50;
/** Folded energy at or above -10 dB (10 %) scores 1: the alias is as strong as a third of the signal amplitude. */
export const CEIL_DB = -10;
/**
 * Below -40 dB the folded part stays under 1 % of the signal amplitude, the same bound the
 * fidelity target sets for the residual above the new Nyquist (DESIGN.md): level low.
 */
export const LOW_DB = -40;
/**
 * At or above -20 dB (10 % of the amplitude) the alias is plainly visible; see the measured
 * calibration printed by test/core/risk/correlation.test.ts: level high.
 */
export const HIGH_DB = -20;

export type RiskLevel = 'low' | 'moderate' | 'high';

/** Folded fraction in dB (10 log10), -Infinity for 0. */
export function fractionDb(fraction: number): number {
  return 10 * Math.log10(fraction);
}

/** Score 0..1 of a folded fraction. */
export function scoreOf(fraction: number): number {
  const db = fractionDb(fraction);
  if (!(db > FLOOR_DB)) return 0;
  return Math.min(1, (db - FLOOR_DB) / (CEIL_DB - FLOOR_DB));
}

/** Level of a folded fraction. */
export function levelOf(fraction: number): RiskLevel {
  const db = fractionDb(fraction);
  if (db >= HIGH_DB) return 'high';
  return db >= LOW_DB ? 'moderate' : 'low';
}

/** Largest folded fraction that still counts as low. */
export const LOW_FRACTION = 10 ** (LOW_DB / 10);
