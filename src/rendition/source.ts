import type { Limits } from '../config.js';
import { FoldwiseError } from '../errors.js';
import { type DecodedImage, type DecodeLimits, decodeImage } from '../codec/decode.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import type { StageClock } from './timings.js';

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

/** Reads a source from the origin (timed as `origin`) and refuses it past the byte limit. */
export async function readSource(
  origin: Origin,
  path: string,
  limits: Limits,
  clock: StageClock,
  signal?: AbortSignal,
): Promise<ReadSource> {
  const source = await clock.time('origin', () => origin.read(path, signal));
  if (source.bytes.length > limits.maxSourceBytes) {
    throw new FoldwiseError(
      'ERR_SOURCE_TOO_LARGE',
      `the source has ${source.bytes.length} bytes; the limit is ${limits.maxSourceBytes}`,
    );
  }
  return { identity: source.identity, bytes: source.bytes };
}

/** Decodes read bytes within the pixel limits (timed as `decode`). */
export async function decodeSource(source: ReadSource, limits: Limits, clock: StageClock): Promise<LoadedSource> {
  const decoded = await clock.time('decode', () => decodeImage(source.bytes, decodeLimits(limits)));
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
): Promise<LoadedSource> {
  return decodeSource(await readSource(origin, path, limits, clock, signal), limits, clock);
}
