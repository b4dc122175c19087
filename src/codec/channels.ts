import type { Channels, PixelRaster } from '../core/types.js';

/**
 * Channel-layout fix-ups after decoding. Both return a new raster (never in place) or the
 * input itself when there is nothing to do.
 */

/** Drops an alpha channel that is fully opaque everywhere (2 -> 1, 4 -> 3 channels). */
export function dropOpaqueAlpha(raster: PixelRaster): PixelRaster {
  const { data, width, height, channels } = raster;
  if (channels !== 2 && channels !== 4) return raster;
  const opaque = data instanceof Uint16Array ? 65535 : 255;
  for (let i = channels - 1; i < data.length; i += channels) if (data[i] !== opaque) return raster;
  return pick(raster, channels === 4 ? [0, 1, 2] : [0]);
}

/** RGBA whose colour is grey (R = G = B) -> grey + alpha, keeping G and A. */
export function collapseGreyAlpha(raster: PixelRaster): PixelRaster {
  return raster.channels === 4 ? pick(raster, [1, 3]) : raster;
}

function pick(raster: PixelRaster, keep: readonly number[]): PixelRaster {
  const { data, width, height, channels } = raster;
  const n = width * height;
  const out = data instanceof Uint16Array ? new Uint16Array(n * keep.length) : new Uint8Array(n * keep.length);
  for (let p = 0, o = 0; p < n; p++) {
    const i = p * channels;
    for (let k = 0; k < keep.length; k++) out[o++] = data[i + keep[k]];
  }
  return { data: out, width, height, channels: keep.length as Channels };
}
