/**
 * A spool file as a source that is still being written, for tasks that read its rows while
 * libvips decodes (the new source's analysis, src/pool/analysis.ts): the writer's state that
 * SpoolRows waits on follows the decode, as RenderPool.resampleSpooled's own does.
 */
import type { SpooledRaster } from '../worker.js';
import { type SpoolShape, STOPPED, WRITING, WRITTEN } from './rows.js';

export interface LiveSpool {
  raster: SpooledRaster;
  /** Calls the readers off (they throw SpoolReadError 'stopped'); idempotent. */
  stop(): void;
}

/**
 * The file at `path` with its rows as `written` delivers them: WRITTEN once it resolves,
 * STOPPED once it rejects or stop() is called, whichever comes first (later ones change nothing
 * but a stop, which always ends the readers).
 */
export function liveSpool(path: string, shape: SpoolShape & { channels: 1 | 3 }, written: Promise<void>): LiveSpool {
  const state = new Int32Array(new SharedArrayBuffer(4));
  const settle = (to: number) => {
    if (Atomics.compareExchange(state, 0, WRITING, to) === WRITING) Atomics.notify(state, 0);
  };
  written.then(() => settle(WRITTEN), () => settle(STOPPED));
  const { width, height, channels, depth } = shape;
  return {
    raster: { path, width, height, channels, depth, state: state.buffer as SharedArrayBuffer },
    stop() {
      Atomics.store(state, 0, STOPPED);
      Atomics.notify(state, 0);
    },
  };
}
