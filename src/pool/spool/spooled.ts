import type { PixelRaster } from '../../core/types.js';
import { FoldwiseError } from '../../errors.js';
import { SpoolWriteError } from '../../codec/spool-decode.js';
import type { SpooledRaster } from '../worker.js';
import { SpoolReadError, type SpoolShape, STOPPED, WRITING, WRITTEN } from './rows.js';

/**
 * Resamples a source that a decoder is still writing to the spool file at `path`
 * (src/codec/spool-decode.ts, whose `written` is passed here): the workers read the rows
 * from the file as they appear (rows.ts) and start on the top of the image while the
 * rest is decoded, so most of the resampling overlaps the decode, and no copy of the whole
 * source is made. The decode's own error (ERR_SOURCE_CORRUPT, ...) wins over the render's;
 * a spool file that cannot be read back, or is not what was written, gives SpoolWriteError
 * (the caller then decodes in memory). `runBands` runs the pool's bands over the spool file.
 */
export async function resampleSpool(
  path: string,
  shape: SpoolShape & { channels: 1 | 3 },
  written: Promise<void>,
  runBands: (src: SpooledRaster) => Promise<PixelRaster>,
  signal?: AbortSignal,
): Promise<PixelRaster> {
  const state = new Int32Array(new SharedArrayBuffer(4));
  const settle = (to: number) => {
    if (Atomics.compareExchange(state, 0, WRITING, to) === WRITING) Atomics.notify(state, 0);
  };
  let decodeFailure: unknown;
  written.then(
    () => settle(WRITTEN),
    (e: unknown) => {
      decodeFailure = e ?? new Error('the decode failed');
      settle(STOPPED);
    },
  );
  const stop = () => {
    Atomics.store(state, 0, STOPPED);
    Atomics.notify(state, 0);
  };
  const { width, height, channels, depth } = shape;
  const src: SpooledRaster = { path, width, height, channels, depth, state: state.buffer as SharedArrayBuffer };
  signal?.addEventListener('abort', stop, { once: true });
  const bands = runBands(src);
  try {
    // The decode must end cleanly too: one that fails after writing its last row (a broken
    // trailer, a write error) is not rendered and cached.
    const [out] = await Promise.all([bands, written]);
    return out;
  } catch (e) {
    stop();
    // The band tasks give up at once once stopped, but one still queued behind busy workers
    // would outlive this render and its admission permit in piscina's bounded queue.
    await bands.catch(() => undefined);
    // A failed decode stops the workers: report the decode's error.
    if (decodeFailure !== undefined) throw decodeFailure;
    // A spool file that cannot be read, or is not what was written, says nothing of the source.
    if (e instanceof SpoolReadError) throw new SpoolWriteError(`the spool file ${path} could not be read back`, { cause: e });
    throw e instanceof FoldwiseError ? e : new FoldwiseError('ERR_RENDER_FAILED', 'resampling failed', { cause: e });
  } finally {
    signal?.removeEventListener('abort', stop);
  }
}
