import type { PixelRaster } from '../types.js';
import { linearToSrgb8, srgbToLinear8, srgbToLinear16 } from './srgb.js';

/**
 * The mean colour of a raster in linear light, as 8-bit sRGB codes [r, g, b]: each pixel's
 * codes decoded to light (IEC 61966-2-1), averaged weighted by alpha (a transparent pixel
 * adds no colour), encoded back, correctly rounded. This is the colour the picture shows when
 * blurred to one pixel; the mean of the codes would be darker wherever the picture has
 * contrast (black/white stripes: 188, not 128; CHECKS.md).
 *
 * Contract: reads `raster` (8- or 16-bit sRGB codes, 1..4 channels, alpha last when present,
 * not premultiplied); allocates nothing per pixel. A fully transparent raster gives black.
 */
export function linearMeanColour(raster: PixelRaster): [number, number, number] {
  const { data, channels } = raster;
  const table = data instanceof Uint16Array ? srgbToLinear16 : srgbToLinear8;
  const alphaMax = data instanceof Uint16Array ? 65535 : 255;
  // Grey (1 or 2 channels) reads its one value three times.
  const [gi, bi] = channels >= 3 ? [1, 2] : [0, 0];
  const hasAlpha = channels === 2 || channels === 4;
  let r = 0;
  let g = 0;
  let b = 0;
  let weight = 0;
  for (let i = 0; i < data.length; i += channels) {
    const a = hasAlpha ? data[i + channels - 1] / alphaMax : 1;
    r += a * table[data[i]];
    g += a * table[data[i + gi]];
    b += a * table[data[i + bi]];
    weight += a;
  }
  if (!(weight > 0)) return [0, 0, 0];
  return [linearToSrgb8(r / weight), linearToSrgb8(g / weight), linearToSrgb8(b / weight)];
}

/** `#rrggbb` of three 8-bit codes (lower case, as CSS writes hex colours). */
export function hexColour([r, g, b]: readonly number[]): string {
  return `#${[r, g, b].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}
