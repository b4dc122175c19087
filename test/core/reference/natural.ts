import { linearToSrgb8 } from '../../../src/core/index.js';
import type { PixelRaster } from '../../../src/core/types.js';

/**
 * A seeded random field with a 1/f amplitude spectrum (the statistics of natural images, Field
 * 1987 (from memory)), as a sum of 300 plane waves of random orientation and phase, stored as
 * 8-bit sRGB RGB with a different mix per channel. A stochastic pattern, not an invented photo.
 */
export function naturalField(w: number, h: number, seed: number): PixelRaster {
  let s = seed >>> 0;
  const rnd = () => ((s = (s * 1664525 + 1013904223) >>> 0) / 2 ** 32);
  const field = new Float64Array(w * h);
  for (let i = 0; i < 300; i++) {
    const f = 0.004 * Math.pow(0.45 / 0.004, rnd());
    const th = rnd() * Math.PI;
    const ph = rnd() * 2 * Math.PI;
    const fx = 2 * Math.PI * f * Math.cos(th), fy = 2 * Math.PI * f * Math.sin(th);
    const a = 0.02 / Math.sqrt(f * 100);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) field[y * w + x] += a * Math.cos(fx * x + fy * y + ph);
  }
  const data = new Uint8Array(w * h * 3);
  for (let i = 0; i < w * h; i++) {
    data[i * 3] = linearToSrgb8(0.25 + field[i]);
    data[i * 3 + 1] = linearToSrgb8(0.2 + 0.8 * field[i]);
    data[i * 3 + 2] = linearToSrgb8(0.3 - field[i]);
  }
  return { data, width: w, height: h, channels: 3 };
}
