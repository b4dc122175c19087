import type { Limits } from '../config.js';
import { FoldwiseError } from '../errors.js';
import { type DecodedImage, decodeImage } from '../media/decode.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import type { StageClock } from './timings.js';

export interface LoadedSource {
  identity: SourceIdentity;
  decoded: DecodedImage;
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
  const source = await clock.time('origin', () => origin.read(path, signal));
  if (source.bytes.length > limits.maxSourceBytes) {
    throw new FoldwiseError(
      'ERR_SOURCE_TOO_LARGE',
      `the source has ${source.bytes.length} bytes; the limit is ${limits.maxSourceBytes}`,
    );
  }
  const decoded = await clock.time('decode', () =>
    decodeImage(source.bytes, {
      maxPixels: limits.maxPixels,
      maxDimension: limits.maxDimension,
      maxFrames: limits.maxFrames,
      timeoutMs: limits.decodeTimeoutMs,
    }),
  );
  return { identity: source.identity, decoded };
}
