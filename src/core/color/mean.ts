import type { PixelRaster } from '../types.js';
import { displayP3Space, rgbToRgb, srgbSpace } from './primaries.js';
import { linearToSrgb8, srgbToLinear8, srgbToLinear16 } from './srgb.js';

// Display P3 -> sRGB in linear light (SMPTE RP 177 matrices of both spaces' primaries; same white).
const p3ToSrgb = rgbToRgb(displayP3Space, srgbSpace);

/**
 * The mean colour of a raster in linear light, as 8-bit sRGB codes [r, g, b]: each pixel's
 * codes decoded to light (IEC 61966-2-1), averaged weighted by alpha (a transparent pixel
 * adds no colour), encoded back, correctly rounded. This is the colour the picture shows when
 * blurred to one pixel; the mean of the codes would be darker wherever the picture has
 * contrast (black/white stripes: 188, not 128; CHECKS.md).
 *
 * Contract: reads `raster` (8- or 16-bit sRGB codes, 1..4 channels, alpha last when present,
 * not premultiplied); allocates nothing per pixel. A fully transparent raster gives black.
 * A Display P3 raster (same transfer function) has its mean taken to sRGB's primaries,
 * clipped to sRGB's gamut: the colour is for CSS, whose hex colours are sRGB.
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
  const mean = [r / weight, g / weight, b / weight];
  const [lr, lg, lb] = raster.gamut === 'display-p3' && channels >= 3 ? toSrgb(mean) : mean;
  return [linearToSrgb8(lr), linearToSrgb8(lg), linearToSrgb8(lb)];
}

/** Linear Display P3 to linear sRGB, each clipped to [0, 1]. */
function toSrgb([r, g, b]: number[]): number[] {
  const m = p3ToSrgb;
  return [0, 3, 6].map((i) => Math.min(1, Math.max(0, m[i] * r + m[i + 1] * g + m[i + 2] * b)));
}

/** `#rrggbb` of three 8-bit codes (lower case, as CSS writes hex colours). */
export function hexColour([r, g, b]: readonly number[]): string {
  return `#${[r, g, b].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}
