/**
 * Analytic test patterns defined in linear light and encoded with the sRGB curve of
 * IEC 61966-2-1:1999 (written out here from CHECKS.md, independent of src/core/color).
 * Their correct answers follow from their formulas; no invented pictures.
 */
import type { PixelRaster } from '../../../src/core/types.js';
import { seededRandom } from '../spectrum/signals.js';

/** IEC 61966-2-1 encode: V = 12.92 L (L <= 0.0031308), else 1.055 L^(1/2.4) - 0.055. */
export function encodeSrgb(l: number): number {
  const v = Math.min(1, Math.max(0, l));
  return v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055;
}

/** IEC 61966-2-1 decode of a code value in 0..1. */
export function decodeSrgb(c: number): number {
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}

export type Pattern = (x: number, y: number) => number;

/** A grey raster (1 channel) of a linear-light pattern, 8- or 16-bit sRGB codes. */
export function greyRaster(width: number, height: number, pattern: Pattern, bits: 8 | 16 = 16): PixelRaster {
  const max = bits === 8 ? 255 : 65535;
  const data = bits === 8 ? new Uint8Array(width * height) : new Uint16Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) data[y * width + x] = Math.round(encodeSrgb(pattern(x, y)) * max);
  }
  return { data, width, height, channels: 1 };
}

/** Linear luminance of a grey raster, decoded with the IEC 61966-2-1 formula. */
export function linearOf(r: PixelRaster): Float64Array {
  const max = r.data instanceof Uint16Array ? 65535 : 255;
  const out = new Float64Array(r.width * r.height);
  for (let i = 0; i < out.length; i++) out[i] = decodeSrgb(r.data[i * r.channels] / max);
  return out;
}

/** Sinusoidal grating of f cycles/px at `angle` radians, mean 0.5, amplitude a. */
export const grating = (f: number, angle = 0, a = 0.4): Pattern => {
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  return (x, y) => 0.5 + a * Math.cos(2 * Math.PI * f * (c * x + s * y));
};

/** Circular zone plate 0.5 + 0.5 cos(pi r^2 / N), local frequency r / N (Schuler 2014). */
export const zonePlate = (n: number, cx = n / 2, cy = n / 2): Pattern => (x, y) =>
  0.5 + 0.5 * Math.cos((Math.PI * ((x - cx) ** 2 + (y - cy) ** 2)) / n);

/** Linear ramp from 0.1 to 0.9 across `width`. */
export const gradient = (width: number): Pattern => (x) => 0.1 + (0.8 * x) / width;

/** Uniform white noise around 0.5 of the given amplitude (seeded). */
export function noise(width: number, height: number, amplitude: number, seed = 1): Pattern {
  const rnd = seededRandom(seed);
  const v = new Float64Array(width * height);
  for (let i = 0; i < v.length; i++) v[i] = 0.5 + amplitude * (2 * rnd() - 1);
  return (x, y) => v[y * width + x];
}

/** Checkerboard of squares `period` / 2 pixels wide, 0.1 and 0.9. */
export const checker = (period: number): Pattern => (x, y) =>
  (Math.floor((2 * x) / period) + Math.floor((2 * y) / period)) % 2 === 0 ? 0.1 : 0.9;

/** A vertical step edge at x0 from 0.1 to 0.9. */
export const step = (x0: number): Pattern => (x) => (x < x0 ? 0.1 : 0.9);
