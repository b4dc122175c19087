/**
 * Analytic test patterns for the fidelity script and the reference tests. Each is defined in
 * linear light and stored as 8-bit sRGB (IEC 61966-2-1), as a decoder would hand it over.
 */
import { encode8 as linearToSrgb8 } from './srgb.js';
import type { PixelRaster } from '../../src/core/types.js';

export interface Pattern {
  /** The stored 8-bit grey raster. */
  raster: PixelRaster;
  /** Linear value of the defining formula at any (fractional) source position. */
  at(x: number, y: number): number;
}

function grey(w: number, h: number, f: (x: number, y: number) => number): PixelRaster {
  const data = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) data[y * w + x] = linearToSrgb8(f(x, y));
  return { data, width: w, height: h, channels: 1 };
}

/**
 * Circular zone plate I(r) = 0.5 + 0.5 cos(pi r^2 / N), centre c = (N - 1) / 2; local frequency
 * ((x - c) / N, (y - c) / N) cycles per pixel (Schuler 2014, CHECKS.md).
 */
export function zonePlate(n: number): Pattern {
  const c = (n - 1) / 2;
  const at = (x: number, y: number) => 0.5 + 0.5 * Math.cos((Math.PI * ((x - c) ** 2 + (y - c) ** 2)) / n);
  return { raster: grey(n, n, at), at };
}

/** Vertical sinusoidal grating 0.5 + 0.4 cos(2 pi f x), f in cycles per source pixel. */
export function grating(w: number, h: number, f: number): Pattern {
  const at = (x: number) => 0.5 + 0.4 * Math.cos(2 * Math.PI * f * x);
  return { raster: grey(w, h, at), at };
}

/** A vertical step from linear `low` to `high` between columns edge - 1 and edge. */
export function step(w: number, h: number, edge: number, low: number, high: number): Pattern {
  const at = (x: number) => (x < edge - 0.5 ? low : high);
  return { raster: grey(w, h, at), at };
}

/**
 * A vertical step from linear `low` to `high` at a fractional position `edge` (source x; pixel x
 * covers [x - 1/2, x + 1/2]): the pixel the edge crosses holds the area mix, so edges between
 * pixel boundaries sample every sub-pixel phase of the output grid.
 */
export function stepAt(w: number, h: number, edge: number, low: number, high: number): Pattern {
  const at = (x: number) => low + (high - low) * Math.min(1, Math.max(0, x + 0.5 - edge));
  return { raster: grey(w, h, at), at };
}

/** 1-pixel black and white vertical stripes (CHECKS.md: halved in linear light -> 188). */
export function stripes(w: number, h: number): Pattern {
  const at = (x: number) => (Math.round(x) % 2 ? 1 : 0);
  return { raster: grey(w, h, at), at };
}
