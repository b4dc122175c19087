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

/**
 * Write the luminance of the size x size tile whose top-left corner is (x0, y0) into `out`
 * (row-major, size * size values). The tile must lie inside the raster (the caller's layout
 * guarantees it). Not in place; allocates nothing.
 */
export function tileLuminance(out: Float64Array, src: PixelRaster, x0: number, y0: number, size: number): void {
  const { data, width, channels } = src;
  const wide = data instanceof Uint16Array;
  const lut = wide ? srgbToLinear16 : srgbToLinear8;
  const alphaScale = wide ? 1 / 65535 : 1 / 255;
  const [KR, KG, KB] = src.gamut === 'display-p3' ? p3 : rec709;
  for (let y = 0; y < size; y++) {
    let p = ((y0 + y) * width + x0) * channels;
    const row = y * size;
    if (channels === 1) {
      for (let x = 0; x < size; x++, p++) out[row + x] = lut[data[p]];
    } else if (channels === 2) {
      for (let x = 0; x < size; x++, p += 2) out[row + x] = lut[data[p]] * data[p + 1] * alphaScale;
    } else if (channels === 3) {
      for (let x = 0; x < size; x++, p += 3) {
        out[row + x] = KR * lut[data[p]] + KG * lut[data[p + 1]] + KB * lut[data[p + 2]];
      }
    } else {
      for (let x = 0; x < size; x++, p += 4) {
        const y709 = KR * lut[data[p]] + KG * lut[data[p + 1]] + KB * lut[data[p + 2]];
        out[row + x] = y709 * data[p + 3] * alphaScale;
      }
    }
  }
}
