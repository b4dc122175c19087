/**
 * Worker-thread entry (piscina): resamples one band of output rows. Imports only the pure
 * core. The source and the output live in SharedArrayBuffers, so two workers can render
 * different bands of one rendition without copying the source twice.
 */
import { renderRaster } from './core/index.js';
import { simdKernels } from './core/simd/index.js';
import type { Channels, PixelRaster, Plan } from './core/types.js';

// Compile and instantiate the SIMD kernels when the thread starts, not in its first render.
simdKernels();

/** A raster whose samples live in a SharedArrayBuffer. */
export interface SharedRaster {
  buffer: SharedArrayBuffer;
  width: number;
  height: number;
  channels: Channels;
  depth: 8 | 16;
}

export interface ResampleTask {
  src: SharedRaster;
  plan: Plan;
  /** Output rows [from, to) this task renders. */
  rows: [number, number];
  /** The whole output (plan.targetWidth x plan.targetHeight), same channels and depth. */
  out: SharedArrayBuffer;
  /**
   * For a source still being written into `src.buffer` (src/render/feed.ts): an Int32Array's
   * buffer of [state, rowsReady], state 0 while rows arrive, 1 once all are in, 2 when the
   * decode failed or the render was called off. Without it the source is complete.
   */
  progress?: SharedArrayBuffer;
}

/** Row y's arrival, waited for on the progress counters (woken by Atomics.notify, or polled). */
function rowWaiter(progress: SharedArrayBuffer): (y: number) => void {
  const p = new Int32Array(progress);
  return (y) => {
    for (;;) {
      const ready = Atomics.load(p, 1);
      if (ready > y) return;
      if (Atomics.load(p, 0) === 2) throw new Error('the source stopped arriving');
      Atomics.wait(p, 1, ready, 100);
    }
  };
}

/** The first `length` samples of `buffer` (a reused buffer may be longer than the raster). */
function view(buffer: SharedArrayBuffer, depth: 8 | 16, length: number): Uint8Array | Uint16Array {
  return depth === 16 ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length);
}

/** Renders rows [from, to) of the plan's output into `out`; returns the number of rows done. */
export default function resample(task: ResampleTask): number {
  const { src, plan, rows, out, progress } = task;
  const samples = src.width * src.height * src.channels;
  const source: PixelRaster = { data: view(src.buffer, src.depth, samples), width: src.width, height: src.height, channels: src.channels };
  const band = renderRaster(source, plan, { rows, awaitRow: progress && rowWaiter(progress) });
  const outSamples = plan.targetWidth * plan.targetHeight * src.channels;
  view(out, src.depth, outSamples).set(band.data, rows[0] * plan.targetWidth * src.channels);
  return band.height;
}
