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
 * Below -40 dB the folded part stays under 1 % of the detail's amplitude: for a full-contrast
 * pattern (linear amplitude 0.4) an alias of RMS 0.0028, under half an 8-bit code step at
 * mid-grey (codes 188 -> 189 are 0.0060 apart in linear light, IEC 61966-2-1), so it cannot
 * show in an 8-bit rendition. It is also the bound the fidelity target sets for the residual
 * above the new Nyquist (DESIGN.md). Level low below it.
 */
export const LOW_DB = -40;
/**
 * At or above -20 dB the alias has 10 % of the detail's amplitude: about five code steps at
 * mid-grey for a full-contrast pattern, far above the ~1 % contrast people see at these
 * frequencies (from memory; contrast-sensitivity data), so the moiré is plainly visible.
 * Level high from here. The reported fraction matches the alias energy measured in real
 * renders within about 1 dB (test/core/risk/correlation.test.ts), so these levels hold for
 * the rendered output, not just for the model.
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
