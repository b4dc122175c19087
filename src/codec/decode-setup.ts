/**
 * What every decode of a source shares: the limits, the header checks, the sharp pipeline
 * (upright, sRGB, 8 or 16 bits, first frame), the deadline and the mapping of sharp's
 * failures onto our error codes (decode.ts, spool-decode.ts).
 */
import sharp, { type Metadata, type Sharp, type SharpOptions } from 'sharp';
sharp.cache(false);
import { FoldwiseError } from '../errors.js';
import { withinMs } from '../lib/deadline.js';
import type { GamutName } from '../core/color/primaries.js';
import { sourceFormats } from './formats.js';
import { gifReachesTrailer } from './gif-blocks.js';
import { isWideGamutProfile } from './icc.js';
import { type Animation, animationOf, type DecodeWish, stillSrgb } from './wish.js';
import { hasAcceptedSignature } from './signature.js';
import { checkWebp, WebpDamage } from './webp/check.js';

export { type Animation, type DecodeWish, stillSrgb } from './wish.js';

export interface DecodeLimits {
  /** Most pixels (width x height of one frame) a source may have. */
  maxPixels: number;
  /** Longest side a source may have, in pixels. */
  maxDimension: number;
  /** Most animation frames (pages) a source may declare. */
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
  /** The primaries of the decoded codes. */
  gamut: GamutName;
  /** Frames in the source (1 for a still). */
  pages: number;
  /** Set when every frame of an animated source is decoded. */
  animation?: Animation;
}

export async function prepare(bytes: Buffer, limits: DecodeLimits, wish: DecodeWish = stillSrgb): Promise<Prepared> {
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
  if (format === 'gif' && !gifReachesTrailer(bytes)) {
    throw new FoldwiseError('ERR_SOURCE_CORRUPT', 'The GIF ends before its trailer: it is truncated.');
  }
  const pages = meta.pages ?? 1;
  const animated = wish.frames === 'all' && pages > 1;
  const [width, height] = checkLimits(meta, limits, animated ? pages : 1);
  if (format === 'webp') await checkWebpOnce(bytes);
  if (typeof wish.frames === 'number') {
    if (wish.frames >= pages) throw new FoldwiseError('ERR_PARAM_INVALID', `still=${wish.frames + 1} asks for a frame the source lacks: it has ${pages}.`);
    options.page = wish.frames;
  } else if (animated) {
    options.pages = -1;
  }
  const animation = animated ? animationOf(meta, pages) : undefined;

  const grey = meta.space === 'b-w' || meta.space === 'grey16';
  const deep = meta.depth !== 'uchar' && meta.depth !== 'char';
  // sharp's 8-bit 'b-w' output drops alpha, so 8-bit grey + alpha comes out as sRGB + alpha
  // (R = G = B) and is collapsed back to two channels below.
  const greyAlpha8 = grey && !deep && meta.hasAlpha;
  // A wide profile kept: sharp's input transform (to sRGB for 8 bits) is skipped and the one
  // output transform goes from the embedded profile straight to Display P3.
  const wide = wish.gamut === 'source' && !grey && isWideGamutProfile(meta.icc);
  if (wide) options.ignoreIcc = true;
  let pipeline = sharp(bytes, options).toColourspace(
    grey && !greyAlpha8 ? (deep ? 'grey16' : 'b-w') : deep ? 'rgb16' : 'srgb',
  );
  // For 16-bit RGB with a profile sharp converts to P3 and stops there; this converts on to
  // sRGB. Without an embedded profile the samples are taken as sRGB already (common
  // practice), and an output transform would wrongly treat them as P3.
  if (wide) pipeline = pipeline.withIccProfile('p3');
  else if (deep && !grey && meta.icc) pipeline = pipeline.withIccProfile('srgb');
  // libvips stops the work itself too (whole seconds only), so a timed-out decode does not
  // keep a thread busy after the caller has been answered.
  if (limits.timeoutMs !== undefined) pipeline = pipeline.timeout({ seconds: Math.max(1, Math.ceil(limits.timeoutMs / 1000)) });
  const gamut: GamutName = wide ? 'display-p3' : 'srgb';
  return { pipeline, format, width, height, deep, grey, greyAlpha8, hasAlpha: meta.hasAlpha === true, gamut, pages, animation };
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

/** The upright size of one frame, once checked against the limits (pixels counted over `frames`). */
function checkLimits(meta: Metadata, limits: DecodeLimits, frames: number): [number, number] {
  const width = meta.autoOrient?.width ?? meta.width;
  const height = meta.autoOrient?.height ?? meta.height;
  const pages = meta.pages ?? 1;
  if (limits.maxFrames !== undefined && pages > limits.maxFrames) {
    throw new FoldwiseError(
      'ERR_LIMIT_SOURCE_FRAMES',
      `The source has ${pages} frames; the limit is ${limits.maxFrames}.`,
    );
  }
  if (!(width > 0 && height > 0)) {
    throw new FoldwiseError('ERR_SOURCE_CORRUPT', 'The source header gives no size.');
  }
  if (width * height * frames > limits.maxPixels) {
    const detail = frames > 1
      ? `The source has ${frames} frames of ${width}x${height} pixels, ${width * height * frames} in all; the limit is ${limits.maxPixels} pixels, counted over every frame.`
      : `The source has ${width}x${height} pixels; the limit is ${limits.maxPixels} pixels.`;
    throw new FoldwiseError('ERR_SOURCE_PIXELS_EXCEEDED', detail);
  }
  if (Math.max(width, height) > limits.maxDimension) {
    throw new FoldwiseError(
      'ERR_LIMIT_SOURCE_DIMENSION',
      `The source is ${width}x${height}; no side may exceed ${limits.maxDimension} pixels.`,
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
