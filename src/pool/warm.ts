/**
 * The worker side of a warm start (RenderPool.warm): each thread renders, analyses and decides
 * once on a small analytic pattern before the service says it is ready, so the first request
 * finds the thread's modules loaded, the SIMD kernels compiled and the hot functions compiled.
 */
import { makePlan, renderRaster } from '../core/index.js';
import { analyzeSpectrum } from '../core/risk/index.js';
import { decide } from './analysis.js';

export interface WarmTask {
  /** Int32Array buffer: threads that have warmed so far. */
  arrived: SharedArrayBuffer;
  /** Threads in the pool: each task waits (bounded) until that many have arrived. */
  threads: number;
}

/** Longest a warm task waits for the other threads (they may still be loading). */
const BARRIER_MS = 10_000;

/** Stripes at 0.3 cycles per pixel along x and 0.2 along y: content the 8x reduction folds. */
function pattern(width: number, height: number): Uint8Array {
  const data = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const v = 128 + 100 * Math.cos(2 * Math.PI * (0.3 * x + 0.2 * y));
      data.fill(Math.round(v), (y * width + x) * 3, (y * width + x) * 3 + 3);
    }
  }
  return data;
}

/**
 * Warms this thread, then waits until every thread of the pool has taken a warm task: a thread
 * busy waiting takes no other, so `threads` tasks reach `threads` different threads.
 */
export function warmTask(task: WarmTask): number {
  const width = 320;
  const height = 240;
  const src = { data: pattern(width, height), width, height, channels: 3 as const };
  const plan = makePlan({ sourceWidth: width, sourceHeight: height, targetWidth: 40, targetHeight: 30, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  renderRaster(src, plan);
  decide(analyzeSpectrum(src), plan);
  const arrived = new Int32Array(task.arrived);
  Atomics.add(arrived, 0, 1);
  Atomics.notify(arrived, 0);
  const until = Date.now() + BARRIER_MS;
  for (let n = Atomics.load(arrived, 0); n < task.threads && Date.now() < until; n = Atomics.load(arrived, 0)) {
    Atomics.wait(arrived, 0, n, 50);
  }
  return Atomics.load(arrived, 0);
}
