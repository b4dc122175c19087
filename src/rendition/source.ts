import type { Limits } from '../config.js';
import { FoldwiseError } from '../errors.js';
import { type DecodedImage, type DecodeLimits, type DecodeWish, decodeImage } from '../codec/decode.js';
import { stillSrgb } from '../codec/decode-setup.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { formatSpecs } from '../codec/formats.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import type { StageClock } from './timings.js';
import type { SourceMemo } from './source-memo.js';

export interface LoadedSource {
  identity: SourceIdentity;
  decoded: DecodedImage;
}

/** A source's bytes as read, within the byte limit, not yet decoded. */
export interface ReadSource {
  identity: SourceIdentity;
  bytes: Buffer;
}

/** The decode limits of the service's limits. */
export function decodeLimits(limits: Limits): DecodeLimits {
  return {
    maxPixels: limits.maxPixels,
    maxDimension: limits.maxDimension,
    maxFrames: limits.maxFrames,
    timeoutMs: limits.decodeTimeoutMs,
  };
}

/**
 * Reads a source from the origin (timed as `origin`) and refuses it past the byte limit. With
 * `kept`, the bytes of the identity just asked for come from the memo when it holds them (no
 * origin read, nothing timed), and bytes read are kept there for the next rendition.
 */
export async function readSource(
  origin: Origin,
  path: string,
  limits: Limits,
  clock: StageClock,
  signal?: AbortSignal,
  kept?: { memo: SourceMemo; asked: SourceIdentity },
): Promise<ReadSource> {
  const known = kept?.memo.get(kept.asked);
  if (known) return known;
  const source = await clock.time('origin', () => origin.read(path, signal));
  if (source.bytes.length > limits.maxSourceBytes) {
    throw new FoldwiseError(
      'ERR_SOURCE_TOO_LARGE',
      `the source has ${source.bytes.length} bytes; the limit is ${limits.maxSourceBytes}`,
    );
  }
  const read = { identity: source.identity, bytes: source.bytes };
  kept?.memo.keep(read);
  return read;
}

/**
 * What a rendition query keeps of its source: the wide gamut unless `gamut=srgb`; every frame
 * unless `still` names one or an explicit format cannot animate (then the first).
 */
export function wishOf(q: Pick<RenditionQuery, 'gamut' | 'still' | 'format'>): DecodeWish {
  const gamut = q.gamut === 'srgb' ? 'srgb' : 'source';
  if (q.still !== undefined) return { gamut, frames: q.still - 1 };
  return { gamut, frames: q.format !== undefined && !formatSpecs[q.format].animates ? 0 : 'all' };
}

/** What the upload hook decodes once for its whole ladder: the source's gamut, every frame. */
export const ladderWish: DecodeWish = { gamut: 'source', frames: 'all' };

/**
 * Whether a source decoded for `had` serves a render that wishes `want`: the same wish, or one
 * that gives the same raster (a still decoded for 'all' frames or for frame 0; a source kept in
 * its own gamut that turned out sRGB).
 */
export function servesWish(decoded: DecodedImage, want: DecodeWish): boolean {
  const had = decoded.wish;
  const firstOrAll = (f: DecodeWish['frames']) => f === 0 || f === 'all';
  const frames = had.frames === want.frames || (!decoded.animation && firstOrAll(had.frames) && firstOrAll(want.frames));
  const gamut = had.gamut === want.gamut || (had.gamut === 'source' && decoded.raster.gamut === undefined);
  return frames && gamut;
}

/** Decodes read bytes within the pixel limits (timed as `decode`); by default an sRGB still. */
export async function decodeSource(source: ReadSource, limits: Limits, clock: StageClock, wish: DecodeWish = stillSrgb): Promise<LoadedSource> {
  const decoded = await clock.time('decode', () => decodeImage(source.bytes, decodeLimits(limits), wish));
  return { identity: source.identity, decoded };
}

/**
 * Reads a source from the origin (timed as `origin`), refuses it past the byte limit, and
 * decodes it within the pixel limits (timed as `decode`).
 */
export async function loadSource(
  origin: Origin,
  path: string,
  limits: Limits,
  clock: StageClock,
  signal?: AbortSignal,
  wish: DecodeWish = stillSrgb,
): Promise<LoadedSource> {
  return decodeSource(await readSource(origin, path, limits, clock, signal), limits, clock, wish);
}
