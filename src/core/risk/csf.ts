/**
 * How visible a pattern is: the contrast-sensitivity function of Mannos & Sakrison (1974),
 * "The effects of a visual fidelity criterion on the encoding of images", IEEE Trans.
 * Information Theory 20(4): A(f) = 2.6 (0.0192 + 0.114 f) exp(-(0.114 f)^1.1), f in cycles per
 * degree, peak 0.981 near 8 cycles/degree (CHECKS.md). A(f) is relative; PEAK_SENSITIVITY
 * gives it an absolute scale.
 */

/** Mannos & Sakrison (1974) relative contrast sensitivity at f cycles per degree. */
export function mannosSakrison(f: number): number {
  const a = 0.114 * Math.abs(f);
  return 2.6 * (0.0192 + a) * Math.exp(-(a ** 1.1));
}

/**
 * Contrast sensitivity (1 / threshold Michelson contrast) at the CSF's peak: 200, a threshold
 * of 0.5 % for a grating of a few cycles on a bright display (from memory: Barten 1999 puts the
 * photopic peak at a few hundred for large fields at 100 cd/m^2; small patches of texture seen
 * in passing sit lower, so 200 is the less alarming end of that range).
 */
export const PEAK_SENSITIVITY = 200;
/** The largest value of A(f) (at 8.0 cycles/degree), so PEAK_SENSITIVITY sits at the peak. */
export const MANNOS_PEAK = 0.9809;

/** Threshold Michelson contrast at f cycles per degree. */
export function contrastThreshold(f: number): number {
  return 1 / (PEAK_SENSITIVITY * (mannosSakrison(f) / MANNOS_PEAK));
}

/**
 * Visual angle of one CSS reference pixel: 1/96 inch seen from 28 inches (CSS Values and Units
 * Level 4, "reference pixel"): atan(1 / (96 * 28)) = 0.02131 degrees.
 */
export const CSS_PIXEL_DEGREES = (Math.atan(1 / (96 * 28)) * 180) / Math.PI;

/** Viewing geometry of a rendition shown at `density` device pixels per CSS pixel. */
export interface Viewing {
  degreesPerPixel: number;
  density: number;
}

export function viewingAt(density: number): Viewing {
  const d = density > 0 && Number.isFinite(density) ? density : 1;
  return { degreesPerPixel: CSS_PIXEL_DEGREES / d, density: d };
}

/** Cycles per degree of a frequency in cycles per output (device) pixel. */
export function cyclesPerDegree(cyclesPerPixel: number, viewing: Viewing): number {
  return Math.abs(cyclesPerPixel) / viewing.degreesPerPixel;
}
