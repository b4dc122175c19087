import type { PixelRaster, Plan } from '../core/types.js';
import type { BandOutcome, SharedRaster, SpooledRaster } from './worker.js';
import type { RunBand } from './runner.js';
import { ownSignal } from './tasks.js';
import { SpoolReadError } from './spool/rows.js';
import { note } from './trace-scope.js';
import { bandWithRest, type RestHandOver } from './rest-band.js';

// Below this many output pixels, from a source below SPLIT_MIN_SOURCE_PIXELS, one worker does
// the whole rendition: a split would cost more in hand-off than it saves (common practice;
// revisit with load/ measurements).
const SPLIT_MIN_PIXELS = 512 * 512;

// A source at least this big is split whatever the output's size: a downscale's work grows with
// the source's area (each band filters the source rows under its output rows, a pyramid's
// levels included), not the output's, and a 640 x 400 rendition of a kept 6.4 MP decode took
// one thread 30 ms while the other sat idle (scripts/bench/timeline.ts --further 640).
const SPLIT_MIN_SOURCE_PIXELS = 1 << 20;

// Fewer output rows than this stay in one band: each band reads its own source rows under the
// kernel's support, so very short bands repeat much of each other's reading (common practice).
const SPLIT_MIN_ROWS = 16;

// A spooled render splits its output only when it shrinks the source's area by less than this:
// 12 MP -> 800 px keeps pace with the decode in one worker, and measured no slower than with
// two bands (1.30-1.37x against 1.37-1.55x sharp's decode-only time, three runs each), since a
// second busy worker slows the decode it overlaps.
const STREAM_SPLIT_SHRINK = 4;

/** The shared output buffer of a render by `plan` over `shared`. */
export function outputBuffer(shared: SharedRaster | SpooledRaster, plan: Plan): SharedArrayBuffer {
  return new SharedArrayBuffer(plan.targetWidth * plan.targetHeight * shared.channels * (shared.depth / 8));
}

/**
 * The plan's bands of output rows, [first, end) each: big outputs are split in two. `arriving`:
 * the source is a spool file still being written (a finished one, a kept decode, is split as
 * a source in memory is).
 */
export function bandRows(threads: number, shared: SharedRaster | SpooledRaster, plan: Plan, arriving: boolean): [number, number][] {
  const h = plan.targetHeight;
  const pixels = plan.targetWidth * h;
  // A source still arriving paces the resample: one worker keeps up with the decode unless
  // the output is large (little shrinking, no pyramid), and the other stays free for the
  // next render instead of waiting on rows.
  const paced = arriving && pixels * STREAM_SPLIT_SHRINK <= shared.width * shared.height;
  const big = pixels >= SPLIT_MIN_PIXELS || shared.width * shared.height >= SPLIT_MIN_SOURCE_PIXELS;
  const split = threads > 1 && big && h >= SPLIT_MIN_ROWS && !paced;
  return split ? [[0, h >> 1], [h >> 1, h]] : [[0, h]];
}

/**
 * Runs the bands' tasks into `out` (with `rest`, a single band hands its rest over, rest-band.ts); rejects with the first band's failure, or SpoolReadError
 * when a band met the spool file's fault (a typed BandOutcome, worker.ts).
 */
export async function runBandTasks(
  runBand: RunBand,
  shared: SharedRaster | SpooledRaster,
  plan: Plan,
  out: SharedArrayBuffer,
  bands: [number, number][],
  signal?: AbortSignal,
  rest?: RestHandOver,
): Promise<void> {
  // Every band settles before the render does, failed or not: a band still queued or running
  // would otherwise outlive the render's admission permit in piscina's bounded queue.
  // A signal of this call's own (tasks.ts), unlinked when the bands end.
  const own = ownSignal(signal);
  // One band of a spooled source hands the rest of its rows to a free thread once the decode ends (rest-band.ts).
  const runs = rest && bands.length === 1
    ? bandWithRest(runBand, shared, plan, out, bands[0], rest, own.signal)
    : bands.map((rows) => runBand({ src: shared, plan, rows, out }, { signal: own.signal }));
  const settled = await Promise.allSettled(runs).finally(own.unlink);
  const failed = settled.find((r) => r.status === 'rejected');
  if (failed) throw failed.reason;
  for (const r of settled as PromiseFulfilledResult<BandOutcome>[]) {
    if (r.value.kind === 'spool') throw new SpoolReadError(r.value.fault, r.value.detail);
    if (r.value.marks) note(...r.value.marks);
  }
}

/** The output raster over the bands' shared buffer. */
export function outputRaster(out: SharedArrayBuffer, shared: SharedRaster | SpooledRaster, plan: Plan): PixelRaster {
  const data = shared.depth === 16 ? new Uint16Array(out) : new Uint8Array(out);
  return { data, width: plan.targetWidth, height: plan.targetHeight, channels: shared.channels };
}
