/**
 * The sRGB transfer function written out from IEC 61966-2-1:1999, independent of the core's
 * lookup tables, so the fidelity figures (ours and sharp's alike) are measured with a ruler the
 * code under test did not make.
 */

/** Linear light 0..1 -> 8-bit code, rounded to nearest (IEC 61966-2-1 encode). */
export function encode8(l: number): number {
  const v = Math.min(1, Math.max(0, l));
  const c = v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055;
  return Math.round(c * 255);
}

/** 8-bit code -> linear light (IEC 61966-2-1 decode), as a table of 256 values. */
export const decode8: Float64Array = Float64Array.from({ length: 256 }, (_, code) => {
  const c = code / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
});
