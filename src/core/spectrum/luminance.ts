/**
 * Linear-light luminance of one square tile of a decoded raster.
 *
 * Codes are decoded with the exact sRGB curve (IEC 61966-2-1:1999; Display P3 shares it) and
 * weighted with the luminance coefficients of the raster's primaries: sRGB / Rec. 709
 * (ITU-R BT.709-6, item 3.2: Y = 0.2126 R + 0.7152 G + 0.0722 B), or Display P3's, derived
 * from SMPTE EG 432-1's primaries as SMPTE RP 177 does (primaries.ts). Alpha multiplies the result (premultiplied), because
 * premultiplied values are what the resampler filters.
 */
import { srgbToLinear16, srgbToLinear8 } from '../color/index.js';
import { displayP3Space, luminanceCoefficients } from '../color/primaries.js';
import type { PixelRaster } from '../types.js';

// ITU-R BT.709-6 luminance coefficients (also IEC 61966-2-1, which shares the primaries).
const rec709: readonly [number, number, number] = [0.2126, 0.7152, 0.0722];
const p3 = luminanceCoefficients(displayP3Space);

/** The luminance coefficients (R, G, B) of the raster's primaries (one shared array per space). */
export function luminanceWeights(src: PixelRaster): readonly [number, number, number] {
  return src.gamut === 'display-p3' ? p3 : rec709;
}

/**
 * Write the luminance of the size x size tile whose top-left corner is (x0, y0), times the
 * row-major size x size window `w2`, into `out`, and return the sum of what was written (one
 * pass: the window is applied as each value is made). Value (x, y) goes to
 * out[rev[y] * size + rev[x]]: `rev` is the FFT's bit-reversal table (fft2dBitReversed), or
 * the identity for natural order. The tile must lie inside the raster (the caller's layout
 * guarantees it). Not in place; allocates nothing.
 */
export function windowedTileLuminance(
  out: Float64Array,
  src: PixelRaster,
  x0: number,
  y0: number,
  size: number,
  w2: Float64Array,
  rev: Uint32Array,
): number {
  const { data, width, channels } = src;
  const wide = data instanceof Uint16Array;
  const lut = wide ? srgbToLinear16 : srgbToLinear8;
  const alphaScale = wide ? 1 / 65535 : 1 / 255;
  const [KR, KG, KB] = luminanceWeights(src);
  let sum = 0;
  for (let y = 0; y < size; y++) {
    let p = ((y0 + y) * width + x0) * channels;
    const row = y * size;
    const dst = rev[y] * size;
    if (channels === 3) {
      for (let x = 0; x < size; x++, p += 3) {
        const v = (KR * lut[data[p]] + KG * lut[data[p + 1]] + KB * lut[data[p + 2]]) * w2[row + x];
        out[dst + rev[x]] = v;
        sum += v;
      }
    } else if (channels === 4) {
      for (let x = 0; x < size; x++, p += 4) {
        const y709 = KR * lut[data[p]] + KG * lut[data[p + 1]] + KB * lut[data[p + 2]];
        const v = y709 * data[p + 3] * alphaScale * w2[row + x];
        out[dst + rev[x]] = v;
        sum += v;
      }
    } else if (channels === 1) {
      for (let x = 0; x < size; x++, p++) {
        const v = lut[data[p]] * w2[row + x];
        out[dst + rev[x]] = v;
        sum += v;
      }
    } else {
      for (let x = 0; x < size; x++, p += 2) {
        const v = lut[data[p]] * data[p + 1] * alphaScale * w2[row + x];
        out[dst + rev[x]] = v;
        sum += v;
      }
    }
  }
  return sum;
}
