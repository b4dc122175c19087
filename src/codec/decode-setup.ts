/**
 * What every decode of a source shares: the limits, the header checks, the sharp pipeline
 * (upright, sRGB, 8 or 16 bits, first frame), the deadline and the mapping of sharp's
 * failures onto our error codes (decode.ts, spool-decode.ts).
 */
import sharp, { type Metadata, type Sharp, type SharpOptions } from 'sharp';
sharp.cache(false);
import { FoldwiseError } from '../errors.js';
import { withinMs } from '../lib/deadline.js';
import { sourceFormats } from './formats.js';
import { hasAcceptedSignature } from './signature.js';
import { checkWebp, WebpDamage } from './webp/check.js';

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

/** `work`, or ERR_LIMIT_DECODE_TIMEOUT once `timeoutMs` (when given) has passed. */
export function withinDecodeDeadline<T>(work: Promise<T>, timeoutMs: number | undefined): Promise<T> {
  return withinMs(work, timeoutMs, () => new FoldwiseError('ERR_LIMIT_DECODE_TIMEOUT', `Decoding took longer than ${timeoutMs} ms.`));
}

/** The decode's sharp pipeline, set up from the header once its limits are checked. */
export interface Prepared {
  pipeline: Sharp;
  format: string;
  width: number;
  height: number;
  deep: boolean;
  grey: boolean;
  greyAlpha8: boolean;
  hasAlpha: boolean;
}

export async function prepare(bytes: Buffer, limits: DecodeLimits): Promise<Prepared> {
  if (bytes.length === 0) throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', 'The source is empty.');
  const options: SharpOptions = {
    // 'warning', sharp's default: 'error' and 'truncated' let libjpeg's "Corrupt JPEG data:
    // premature end of data segment" pass, so a JPEG with damaged scan data or a frame header
    // larger than its data decoded as grey and was cached (measured with sharp 0.35; see
    // test/codec/decode-damage.test.ts). A file libvips only warns about is refused too.
    failOn: 'warning',
    limitInputPixels: Math.max(1, Math.floor(limits.maxPixels)),
    autoOrient: true,
    pages: 1,
    page: 0,
  };
  const meta = await sharp(bytes, options).metadata().catch((e: unknown) => {
    throw classify(e, bytes);
  });
  const format = checkFormat(meta);
  const [width, height] = checkLimits(meta, limits);
  if (format === 'webp') await checkWebpOnce(bytes);

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

/**
 * libwebp decodes a VP8 stream with damaged DCT tokens into a garbled picture without any
 * error (VP8 has no checksum), so WebP sources go through our own bitstream check first
 * (src/codec/webp/check.ts). Memoised per buffer: the header read at admission and the decode
 * that follows see the same bytes.
 */
const webpChecks = new WeakMap<Buffer, Promise<void>>();
function checkWebpOnce(bytes: Buffer): Promise<void> {
  let check = webpChecks.get(bytes);
  if (!check) {
    check = checkWebp(bytes).catch((e: unknown) => {
      if (!(e instanceof WebpDamage)) throw e;
      throw new FoldwiseError('ERR_SOURCE_CORRUPT', `The source image is corrupt: ${e.message}.`, { cause: e });
    });
    webpChecks.set(bytes, check);
  }
  return check;
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

/**
 * Maps sharp's failures onto our codes; sharp's error travels as the cause. Bytes that carry
 * the signature of an accepted format but that libvips does not recognise (a TIFF cut before
 * its directory) are corrupt, not unsupported.
 */
export function classify(e: unknown, bytes?: Buffer): FoldwiseError {
  const message = e instanceof Error ? e.message : String(e);
  if (/unsupported image format/i.test(message) && !(bytes && hasAcceptedSignature(bytes))) {
    return new FoldwiseError('ERR_SOURCE_UNSUPPORTED', 'The source is not an image format we read.', { cause: e });
  }
  if (/pixel limit/i.test(message)) {
    return new FoldwiseError('ERR_SOURCE_PIXELS_EXCEEDED', 'The source exceeds the pixel limit.', { cause: e });
  }
  return new FoldwiseError('ERR_SOURCE_CORRUPT', 'The source image is corrupt or truncated.', { cause: e });
}
