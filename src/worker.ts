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
}

/** The first `length` samples of `buffer` (a reused buffer may be longer than the raster). */
function view(buffer: SharedArrayBuffer, depth: 8 | 16, length: number): Uint8Array | Uint16Array {
  return depth === 16 ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length);
}

/** Renders rows [from, to) of the plan's output into `out`; returns the number of rows done. */
export default function resample(task: ResampleTask): number {
  const { src, plan, rows, out } = task;
  const samples = src.width * src.height * src.channels;
  const source: PixelRaster = { data: view(src.buffer, src.depth, samples), width: src.width, height: src.height, channels: src.channels };
  const band = renderRaster(source, plan, { rows });
  const outSamples = plan.targetWidth * plan.targetHeight * src.channels;
  view(out, src.depth, outSamples).set(band.data, rows[0] * plan.targetWidth * src.channels);
  return band.height;
}
