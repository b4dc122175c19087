/**
 * The sRGB transfer function, IEC 61966-2-1:1999 (the piecewise curve, not a pure power):
 *   decode  L = C / 12.92                      for C <= 0.04045
 *           L = ((C + 0.055) / 1.055) ^ 2.4   otherwise
 *   encode  V = 12.92 L                        for L <= 0.0031308
 *           V = 1.055 L ^ (1 / 2.4) - 0.055    otherwise
 * Domain: C, V, L in [0, 1]; encode clamps its input to [0, 1] first (negative lobes overshoot).
 */

/** Exact decode of one encoded value in [0, 1] (IEC 61966-2-1). */
export function srgbDecode(c: number): number {
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

/** Exact encode of one linear value, clamped to [0, 1] (IEC 61966-2-1). */
export function srgbEncode(l: number): number {
  if (!(l > 0)) return 0; // also maps NaN to 0
  if (l >= 1) return 1;
  return l <= 0.0031308 ? 12.92 * l : 1.055 * Math.pow(l, 1 / 2.4) - 0.055;
}

function decodeTable(levels: number): Float32Array {
  const t = new Float32Array(levels);
  const max = levels - 1;
  for (let i = 0; i < levels; i++) t[i] = srgbDecode(i / max);
  return t;
}

/** Linear light of every 8-bit sRGB code (256 entries). */
export const srgbToLinear8: Float32Array = decodeTable(256);

/** Linear light of every 16-bit sRGB code (65536 entries). */
export const srgbToLinear16: Float32Array = decodeTable(65536);

/** 8-bit code of a linear value, correctly rounded (round half up) and clamped to 0..255. */
export function linearToSrgb8(v: number): number {
  return Math.floor(srgbEncode(v) * 255 + 0.5);
}

/** 16-bit code of a linear value, correctly rounded and clamped to 0..65535. */
export function linearToSrgb16(v: number): number {
  return Math.floor(srgbEncode(v) * 65535 + 0.5);
}
