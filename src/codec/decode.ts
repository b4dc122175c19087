import type { Channels, PixelRaster } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import { collapseGreyAlpha, dropOpaqueAlpha } from './channels.js';
import { type Animation, classify, type DecodeLimits, type DecodeWish, prepare, stillSrgb, withinDecodeDeadline } from './decode-setup.js';

export type { Animation, DecodeLimits, DecodeWish } from './decode-setup.js';

/** A decoded source: samples in the sRGB transfer function, upright; one frame, or all stacked. */
export interface DecodedImage {
  raster: PixelRaster;
  /** True when the raster carries an alpha channel that is not fully opaque. */
  hasAlpha: boolean;
  /** Source format as sharp names it, except AVIF which is reported as 'avif'. */
  format: string;
  /** Set when every frame of an animated source was decoded, stacked top to bottom in the raster. */
  animation?: Animation;
  /** What the decode was asked to keep (a caller's decoded source serves only the same wish). */
  wish: DecodeWish;
}

/**
 * Decode image bytes into a raster for the core.
 *
 * - EXIF orientation is applied, so the raster is upright.
 * - An embedded ICC profile is converted to sRGB, for 16-bit input too: sharp keeps 16-bit
 *   input in a wide (P3) working space unless the output is converted to sRGB explicitly.
 *   With `wish.gamut` 'source', a wide RGB profile is converted to Display P3 instead and
 *   the raster says so (`raster.gamut`).
 * - CMYK becomes sRGB; grey stays one channel (two with alpha); palettes are expanded.
 * - 16-bit sources stay 16-bit (Uint16Array); everything else is 8-bit.
 * - Animated sources give every frame (wish.frames 'all'), stacked, or the one asked for.
 * - An alpha channel that is fully opaque is dropped, so the rest of the pipeline need not
 *   premultiply and JPEG stays eligible.
 * - Limits are checked from the header before any pixel is decoded, and again by sharp.
 * - Truncated or corrupt data is refused, never half-decoded.
 *
 * @throws FoldwiseError ERR_SOURCE_UNSUPPORTED, ERR_SOURCE_CORRUPT, ERR_SOURCE_PIXELS_EXCEEDED
 */
export async function decodeImage(bytes: Buffer, limits: DecodeLimits, wish: DecodeWish = stillSrgb): Promise<DecodedImage> {
  return withinDecodeDeadline(decodeWithin(bytes, limits, wish), limits.timeoutMs);
}

async function decodeWithin(bytes: Buffer, limits: DecodeLimits, wish: DecodeWish): Promise<DecodedImage> {
  const { pipeline, format, deep, greyAlpha8, gamut, animation, pages } = await prepare(bytes, limits, wish);
  const { data, info } = await pipeline
    .raw({ depth: deep ? 'ushort' : 'uchar' })
    .toBuffer({ resolveWithObject: true })
    .catch((e: unknown) => {
      throw classify(e);
    });

  const channels = info.channels as Channels;
  const samples = deep ? toUint16(data) : new Uint8Array(data.buffer, data.byteOffset, data.length);
  let raster: PixelRaster = { data: samples, width: info.width, height: info.height, channels };
  if (greyAlpha8 && channels === 4) raster = collapseGreyAlpha(raster);
  raster = dropOpaqueAlpha(raster);
  if (gamut !== 'srgb') raster.gamut = gamut;
  if (pages > 1) raster.sourceFrames = pages;
  if (animation && raster.height % animation.frames !== 0) {
    throw new FoldwiseError('ERR_SOURCE_CORRUPT', 'The animated source decoded to frames of unequal height.');
  }
  const hasAlpha = raster.channels === 2 || raster.channels === 4;
  return { raster, hasAlpha, format, ...(animation ? { animation } : {}), wish };
}

/** Native-endian 16-bit view of sharp's output, copied only when the bytes are misaligned. */
function toUint16(data: Buffer): Uint16Array {
  if (data.byteOffset % 2 === 0) return new Uint16Array(data.buffer, data.byteOffset, data.length / 2);
  const copy = new Uint8Array(data);
  return new Uint16Array(copy.buffer, 0, copy.length / 2);
}
