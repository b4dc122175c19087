import type { OutputFormat } from '../codec/formats.js';
import type { SourceHeader } from '../codec/header.js';
import { layoutTiles } from '../core/spectrum/tiles.js';
import { blockRows } from './spool/rows.js';

/**
 * Working set of sharp's encoders, in bytes per output pixel, measured on this machine with
 * sharp 0.35.5 (libvips 8.18.7) on a 3000x2000 8-bit RGB raster of hashed noise (the worst case
 * for the coders' buffers): growth of the process's peak RSS (VmHWM) over one `toBuffer()`
 * with sharp's cache off and one libvips thread. jpeg 40 MiB (7.0 B/px), png 5 MiB (0.8),
 * webp 108 MiB (18.8), avif 274 MiB (48.0). Rounded up, with the output buffer included.
 * GIF (libimagequant + cgif) is not measured: taken as WebP's, per output pixel of all frames.
 */
export const ENCODER_BYTES_PER_PIXEL: Record<OutputFormat, number> = { jpeg: 8, png: 2, webp: 20, avif: 50, gif: 20 };

/** The raster a decode gives, in bytes (every frame of an animation, stacked). */
export function rasterBytes(h: Pick<SourceHeader, 'width' | 'height' | 'channels' | 'bytesPerSample' | 'frames'>): number {
  return h.width * h.height * (h.frames ?? 1) * h.channels * h.bytesPerSample;
}

/**
 * Peak bytes of decoding a source in memory: sharp's output buffer, plus, for a source with
 * alpha, the copy without it that replaces it when the alpha is opaque (media/channels.ts).
 */
export function decodeCost(h: SourceHeader): number {
  const raster = rasterBytes(h);
  return h.hasAlpha ? raster + rasterBytes({ ...h, channels: h.channels - 1 }) : raster;
}

/**
 * Peak bytes of resampling a decoded source: the shared copy the worker threads read
 * (src/pool/staging.ts), or, when streamed, the spool file in /dev/shm of the same size.
 */
export function stagingCost(h: SourceHeader): number {
  return rasterBytes(h);
}

/**
 * Peak bytes of the output side: the resampled raster (shared memory), one more copy of it
 * (the canvas, or 16 -> 8 bits for lossy formats), and the encoder's working set.
 */
export function outputCost(h: SourceHeader, outputPixels: number, format: OutputFormat): number {
  const pixels = outputPixels * (h.frames ?? 1);
  const raster = pixels * h.channels * h.bytesPerSample;
  return 2 * raster + pixels * ENCODER_BYTES_PER_PIXEL[format];
}

/** The whole job: decode in memory (or spool), the staging copy, resample and encode. */
export function renditionCost(h: SourceHeader, outputPixels: number, format: OutputFormat, streamed: boolean): number {
  const source = streamed ? stagingCost(h) : decodeCost(h) + stagingCost(h);
  return source + outputCost(h, outputPixels, format);
}

/**
 * Peak bytes of analysing a streamed source's spectrum in the pool (analysis.ts): the spool
 * reader's block, which holds a Welch tile's rows at least (spool/rows.ts), and the tile copied
 * out of it. About 1 MiB for a 4 MP source, 1.8 MB for 14.7 MP.
 */
export function analysisCost(h: SourceHeader): number {
  const t = layoutTiles(h.width, h.height).tileSize;
  const shape = { width: h.width, height: h.height, channels: h.channels, depth: h.bytesPerSample === 2 ? 16 : 8 } as const;
  return blockRows(shape, t) * h.width * h.channels * h.bytesPerSample + t * t * h.channels * h.bytesPerSample;
}
