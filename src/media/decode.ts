import sharp, { type Metadata, type Sharp, type SharpOptions } from 'sharp';
import type { Channels, PixelRaster } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import { collapseGreyAlpha, dropOpaqueAlpha } from './channels.js';
import { sourceFormats } from './formats.js';

/** A decoded source: sRGB-encoded samples, upright, first frame only. */
export interface DecodedImage {
  raster: PixelRaster;
  /** True when the raster carries an alpha channel that is not fully opaque. */
  hasAlpha: boolean;
  /** Source format as sharp names it, except AVIF which is reported as 'avif'. */
  format: string;
}

export interface DecodeLimits {
  /** Most pixels (width x height of one frame) a source may have. */
  maxPixels: number;
  /** Longest side a source may have, in pixels. */
  maxDimension: number;
  /** Most animation frames (pages) a source may declare; only the first is decoded. */
  maxFrames?: number;
  /** Deadline for the whole decode, in ms (ERR_LIMIT_DECODE_TIMEOUT past it). */
  timeoutMs?: number;
}

/**
 * Decode image bytes into a raster for the core.
 *
 * - EXIF orientation is applied, so the raster is upright.
 * - An embedded ICC profile is converted to sRGB, for 16-bit input too: sharp keeps 16-bit
 *   input in a wide (P3) working space unless the output is converted to sRGB explicitly.
 * - CMYK becomes sRGB; grey stays one channel (two with alpha); palettes are expanded.
 * - 16-bit sources stay 16-bit (Uint16Array); everything else is 8-bit.
 * - Animated sources give their first frame.
 * - An alpha channel that is fully opaque is dropped, so the rest of the pipeline need not
 *   premultiply and JPEG stays eligible.
 * - Limits are checked from the header before any pixel is decoded, and again by sharp.
 * - Truncated or corrupt data is refused, never half-decoded.
 *
 * @throws FoldwiseError ERR_SOURCE_UNSUPPORTED, ERR_SOURCE_CORRUPT, ERR_SOURCE_PIXELS_EXCEEDED
 */
export async function decodeImage(bytes: Buffer, limits: DecodeLimits): Promise<DecodedImage> {
  if (limits.timeoutMs === undefined) return decodeWithin(bytes, limits);
  let timer: NodeJS.Timeout | undefined;
  const deadline = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      reject(new FoldwiseError('ERR_LIMIT_DECODE_TIMEOUT', `Decoding took longer than ${limits.timeoutMs} ms.`));
    }, limits.timeoutMs);
  });
  try {
    return await Promise.race([decodeWithin(bytes, limits), deadline]);
  } finally {
    clearTimeout(timer);
  }
}

/** The decode's sharp pipeline, set up from the header once its limits are checked. */
interface Prepared {
  pipeline: Sharp;
  format: string;
  width: number;
  height: number;
  deep: boolean;
  grey: boolean;
  greyAlpha8: boolean;
  hasAlpha: boolean;
}

async function prepare(bytes: Buffer, limits: DecodeLimits): Promise<Prepared> {
  if (bytes.length === 0) throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', 'The source is empty.');
  const options: SharpOptions = {
    // 'error' refuses truncated and damaged pixel data; sharp's stricter default 'warning'
    // would also refuse the many camera files that carry harmless warnings (common practice).
    failOn: 'error',
    limitInputPixels: Math.max(1, Math.floor(limits.maxPixels)),
    autoOrient: true,
    pages: 1,
    page: 0,
  };
  const meta = await sharp(bytes, options).metadata().catch((e: unknown) => {
    throw classify(e);
  });
  const format = checkFormat(meta);
  const [width, height] = checkLimits(meta, limits);

  const grey = meta.space === 'b-w' || meta.space === 'grey16';
  const deep = meta.depth !== 'uchar' && meta.depth !== 'char';
  // sharp's 8-bit 'b-w' output drops alpha, so 8-bit grey + alpha comes out as sRGB + alpha
  // (R = G = B) and is collapsed back to two channels below.
  const greyAlpha8 = grey && !deep && meta.hasAlpha;
  let pipeline = sharp(bytes, options).toColourspace(
    grey && !greyAlpha8 ? (deep ? 'grey16' : 'b-w') : deep ? 'rgb16' : 'srgb',
  );
  // For 16-bit RGB with a profile sharp converts to P3 and stops there; this converts on to
  // sRGB. Without an embedded profile the samples are taken as sRGB already (common
  // practice), and an output transform would wrongly treat them as P3.
  if (deep && !grey && meta.icc) pipeline = pipeline.withIccProfile('srgb');
  // libvips stops the work itself too (whole seconds only), so a timed-out decode does not
  // keep a thread busy after the caller has been answered.
  if (limits.timeoutMs !== undefined) pipeline = pipeline.timeout({ seconds: Math.max(1, Math.ceil(limits.timeoutMs / 1000)) });
  return { pipeline, format, width, height, deep, grey, greyAlpha8, hasAlpha: meta.hasAlpha === true };
}

async function decodeWithin(bytes: Buffer, limits: DecodeLimits): Promise<DecodedImage> {
  const { pipeline, format, deep, greyAlpha8 } = await prepare(bytes, limits);
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
  return { raster, hasAlpha: raster.channels === 2 || raster.channels === 4, format };
}

/** A decode writing its rows, in order, to a spool file (libvips' own uncompressed format). */
export interface SpooledDecode {
  width: number;
  height: number;
  /** 1 (grey) or 3 (RGB): sources with alpha are not spooled. */
  channels: 1 | 3;
  depth: 8 | 16;
  format: string;
  /** Settles when the last row is written; rejects with the decode's FoldwiseError. */
  written: Promise<void>;
}

/**
 * Starts decoding `bytes` into the file `path` (its name must end in `.v`), as decodeImage
 * would (upright, sRGB, 8 or 16 bits) but row by row as libvips decodes them, so a reader can
 * start on the top rows while the bottom ones are still being decoded (src/render/feed.ts).
 * Returns null, without writing, for a source with alpha: its opacity is known only after the
 * last row, so decodeImage serves it. The header checks and their errors are decodeImage's.
 */
export async function startSpooledDecode(bytes: Buffer, limits: DecodeLimits, path: string): Promise<SpooledDecode | null> {
  const { pipeline, format, width, height, deep, grey, hasAlpha } = await prepare(bytes, limits);
  if (hasAlpha) return null;
  const written = pipeline.toFile(path).then(
    () => undefined,
    (e: unknown) => {
      throw classify(e);
    },
  );
  return { width, height, channels: grey ? 1 : 3, depth: deep ? 16 : 8, format, written };
}

function checkFormat(meta: Metadata): string {
  const name = String(meta.format);
  if (!Object.hasOwn(sourceFormats, name)) {
    throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', `Sources in ${name} format are not accepted.`);
  }
  if (name !== 'heif') return name;
  // The HEIF container also holds HEVC, which this build cannot decode; only AV1 (AVIF).
  if (meta.compression !== 'av1') {
    throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', 'Only AVIF is accepted of the HEIF family.');
  }
  return 'avif';
}

/** The upright size, once checked against the limits. */
function checkLimits(meta: Metadata, limits: DecodeLimits): [number, number] {
  const width = meta.autoOrient?.width ?? meta.width;
  const height = meta.autoOrient?.height ?? meta.height;
  if (!(width > 0 && height > 0)) {
    throw new FoldwiseError('ERR_SOURCE_CORRUPT', 'The source header gives no size.');
  }
  if (width * height > limits.maxPixels) {
    throw new FoldwiseError(
      'ERR_SOURCE_PIXELS_EXCEEDED',
      `The source has ${width}x${height} pixels; the limit is ${limits.maxPixels} pixels.`,
    );
  }
  if (Math.max(width, height) > limits.maxDimension) {
    throw new FoldwiseError(
      'ERR_LIMIT_SOURCE_DIMENSION',
      `The source is ${width}x${height}; no side may exceed ${limits.maxDimension} pixels.`,
    );
  }
  const frames = meta.pages ?? 1;
  if (limits.maxFrames !== undefined && frames > limits.maxFrames) {
    throw new FoldwiseError(
      'ERR_LIMIT_SOURCE_FRAMES',
      `The source has ${frames} frames; the limit is ${limits.maxFrames}.`,
    );
  }
  return [width, height];
}

/** Maps sharp's failures onto our codes; sharp's error travels as the cause. */
function classify(e: unknown): FoldwiseError {
  const message = e instanceof Error ? e.message : String(e);
  if (/unsupported image format/i.test(message)) {
    return new FoldwiseError('ERR_SOURCE_UNSUPPORTED', 'The source is not an image format we read.', { cause: e });
  }
  if (/pixel limit/i.test(message)) {
    return new FoldwiseError('ERR_SOURCE_PIXELS_EXCEEDED', 'The source exceeds the pixel limit.', { cause: e });
  }
  return new FoldwiseError('ERR_SOURCE_CORRUPT', 'The source image is corrupt or truncated.', { cause: e });
}

/** Native-endian 16-bit view of sharp's output, copied only when the bytes are misaligned. */
function toUint16(data: Buffer): Uint16Array {
  if (data.byteOffset % 2 === 0) return new Uint16Array(data.buffer, data.byteOffset, data.length / 2);
  const copy = new Uint8Array(data);
  return new Uint16Array(copy.buffer, 0, copy.length / 2);
}
