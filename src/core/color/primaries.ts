/**
 * RGB colour spaces by their primaries and white point, and what follows from them by pure
 * arithmetic: the RGB-to-XYZ matrix (SMPTE RP 177-1993, "Derivation of basic television color
 * equations") and the luminance coefficients (its middle row). The ICC profiles themselves are
 * read and converted at the codec edge (lcms, through sharp); the core only needs to know
 * which primaries a raster's codes refer to.
 */

/** Chromaticity (x, y) in CIE 1931. */
export type Chromaticity = readonly [number, number];

export interface RgbSpace {
  red: Chromaticity;
  green: Chromaticity;
  blue: Chromaticity;
  white: Chromaticity;
}

/** The names a raster's colour space may have; absent on a raster means sRGB. */
export type GamutName = 'srgb' | 'display-p3';

/** D65 of CIE 15 as the standards below round it (IEC 61966-2-1, SMPTE EG 432-1). */
const d65: Chromaticity = [0.3127, 0.329];

/** sRGB: IEC 61966-2-1:1999 §3.1 (the ITU-R BT.709 primaries), white D65. */
export const srgbSpace: RgbSpace = { red: [0.64, 0.33], green: [0.3, 0.6], blue: [0.15, 0.06], white: d65 };

/**
 * Display P3: the DCI-P3 primaries of SMPTE EG 432-1:2010, the D65 white point and the sRGB
 * transfer function (so the core's sRGB curve linearises its codes exactly).
 */
export const displayP3Space: RgbSpace = { red: [0.68, 0.32], green: [0.265, 0.69], blue: [0.15, 0.06], white: d65 };

/** Adobe RGB (1998) Color Image Encoding, version 2005-05, §4.2.2 (primaries) and §4.2.3 (D65). */
export const adobeRgbSpace: RgbSpace = { red: [0.64, 0.33], green: [0.21, 0.71], blue: [0.15, 0.06], white: d65 };

/** ITU-R BT.2020-2, Table 3 items 1.3 and 1.4. */
export const rec2020Space: RgbSpace = { red: [0.708, 0.292], green: [0.17, 0.797], blue: [0.131, 0.046], white: d65 };

/** The space of each raster gamut name. */
export const gamutSpaces: Readonly<Record<GamutName, RgbSpace>> = { srgb: srgbSpace, 'display-p3': displayP3Space };

/** Row-major 3x3 matrix. */
export type Matrix3 = [number, number, number, number, number, number, number, number, number];

function xyz([x, y]: Chromaticity): [number, number, number] {
  return [x / y, 1, (1 - x - y) / y];
}

function invert(m: Matrix3): Matrix3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h;
  const B = -(d * i - f * g);
  const C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!(Math.abs(det) > 1e-12)) throw new RangeError('the primaries are collinear');
  return [A / det, -(b * i - c * h) / det, (b * f - c * e) / det, B / det, (a * i - c * g) / det, -(a * f - c * d) / det, C / det, -(a * h - b * g) / det, (a * e - b * d) / det];
}

/**
 * The matrix taking linear RGB of `space` to CIE XYZ with Y = 1 for white, as SMPTE RP 177
 * §3.3 derives it: the primaries' XYZ (at Y = 1) as columns, each scaled so that RGB = (1, 1, 1)
 * gives the white point.
 */
export function rgbToXyz(space: RgbSpace): Matrix3 {
  const [r, g, b] = [xyz(space.red), xyz(space.green), xyz(space.blue)];
  const p: Matrix3 = [r[0], g[0], b[0], r[1], g[1], b[1], r[2], g[2], b[2]];
  const w = xyz(space.white);
  const q = invert(p);
  const s = [0, 1, 2].map((k) => q[3 * k] * w[0] + q[3 * k + 1] * w[1] + q[3 * k + 2] * w[2]);
  return p.map((v, k) => v * s[k % 3]) as Matrix3;
}

/** Luminance coefficients (kR, kG, kB) of a space: the Y row of its RGB-to-XYZ matrix. */
export function luminanceCoefficients(space: RgbSpace): [number, number, number] {
  const m = rgbToXyz(space);
  return [m[3], m[4], m[5]];
}

/** The matrix taking linear RGB of `from` to linear RGB of `to` (same white: no adaptation). */
export function rgbToRgb(from: RgbSpace, to: RgbSpace): Matrix3 {
  const a = invert(rgbToXyz(to));
  const b = rgbToXyz(from);
  const out = new Array<number>(9);
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) out[3 * r + c] = a[3 * r] * b[c] + a[3 * r + 1] * b[3 + c] + a[3 * r + 2] * b[6 + c];
  return out as Matrix3;
}

/**
 * Adobe RGB (1998)'s transfer function, §4.3.1.2 of its specification: a pure power of
 * exponent 563/256 (about 2.2) with no linear segment. Domain [0, 1], clamped.
 */
export function adobeRgbDecode(c: number): number {
  return c > 0 ? Math.pow(Math.min(c, 1), 563 / 256) : 0;
}
