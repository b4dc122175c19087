/**
 * Worker-thread entry (piscina): resamples one band of output rows with the pure core. The
 * source either lives in a SharedArrayBuffer, so two workers can render different bands of
 * one rendition without copying it twice, or is a spool file libvips is still writing, read
 * row by row here (src/pool/spool/rows.ts; with hand-back.ts, analysis.ts and warm.ts the
 * only modules besides the core this thread imports). The output is shared memory too.
 */
import { renderRaster } from '../core/index.js';
import { simdKernels } from '../core/simd/index.js';
import type { Channels, PixelRaster, Plan } from '../core/types.js';
import { threadId, workerData } from 'node:worker_threads';
import { niceThread } from './nice.js';
import { HAND_BACK_MIN_BYTES, handBack } from './hand-back.js';
import { epochNow, type Mark, tracing } from './trace.js';
import { type SpoolFault, SpoolReadError, SpoolRows } from './spool/rows.js';

// Named tasks (piscina's `name`): the analysis and decision of prefilter=auto, the warm start.
export { adaptTask as adapt, analyseTask as analyse } from './analysis.js';
export { warmTask as warm } from './warm.js';

// Compile and instantiate the SIMD kernels when the thread starts, not in its first render.
simdKernels();
// pool.threadNice: yield to the decode, the encode and the event loop when cores are short (nice.ts).
niceThread((workerData as WorkerSetup | undefined)?.nice ?? 0);

/** What the pool gives each thread at its start (piscina's workerData). */
export interface WorkerSetup {
  /** The thread's nice value (pool.threadNice); 0 keeps the process's. */
  nice: number;
}

/** A raster whose samples live in a SharedArrayBuffer. */
export interface SharedRaster {
  buffer: SharedArrayBuffer;
  width: number;
  height: number;
  channels: Channels;
  depth: 8 | 16;
  /** The samples' primaries when not sRGB (a wide-gamut source kept wide): the analysis weighs luminance by them. */
  gamut?: PixelRaster['gamut'];
  /** Frames of the animated source (its first frame staged): the analysis reports them. */
  sourceFrames?: number;
}

/** A raster whose rows are in a spool file being written (src/codec/spool-decode.ts). */
export interface SpooledRaster {
  path: string;
  width: number;
  height: number;
  channels: 1 | 3;
  depth: 8 | 16;
  /** Int32Array buffer of the writer's state (pool/spool/rows.ts: WRITING, WRITTEN, STOPPED). */
  state: SharedArrayBuffer;
}

export interface ResampleTask {
  src: SharedRaster | SpooledRaster;
  plan: Plan;
  /** Output rows [from, to) this task renders. */
  rows: [number, number];
  /** The whole output (plan.targetWidth x plan.targetHeight), same channels and depth. */
  out: SharedArrayBuffer;
  /**
   * A band whose end the pool may lower while it runs (rest-band.ts, bandWithRest): Int32Array
   * [next row, end]; the task writes the row it is about to make, and stops at the end.
   */
  live?: SharedArrayBuffer;
}

/**
 * What a band task answers across the thread boundary: its rows done, or why the spool file
 * could not be read (a typed outcome: the pool never reads error messages to tell them apart).
 * Anything else a task throws is a failed render.
 */
export type BandOutcome = { kind: 'done'; rows: number; marks?: Mark[] } | { kind: 'spool'; fault: SpoolFault; detail: string };

/** The first `length` samples of `buffer` (a reused buffer may be longer than the raster). */
function view(buffer: SharedArrayBuffer, depth: 8 | 16, length: number): Uint8Array | Uint16Array {
  return depth === 16 ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length);
}

/** renderRaster's `more` for a live band: publishes the next row, stops at the end (worker.ts's ResampleTask). */
function liveEnd(live: SharedArrayBuffer | undefined): ((o: number) => boolean) | undefined {
  if (!live) return undefined;
  const at = new Int32Array(live);
  return (o) => {
    Atomics.store(at, 0, o);
    return o < Atomics.load(at, 1);
  };
}

function render(src: SharedRaster | SpooledRaster, plan: Plan, rows: [number, number], into: Uint8Array | Uint16Array, live?: SharedArrayBuffer, marks?: Mark[]): PixelRaster {
  const { width, height, channels, depth } = src;
  const more = liveEnd(live);
  if ('buffer' in src) {
    const data = view(src.buffer, depth, width * height * channels);
    return renderRaster({ data, width, height, channels }, plan, { rows, more, into });
  }
  const spool = new SpoolRows(src.path, src, new Int32Array(src.state));
  try {
    // The rows come from rowAt; the raster's own samples are not read (none are given).
    const data = depth === 16 ? new Uint16Array(0) : new Uint8Array(0);
    return renderRaster({ data, width, height, channels }, plan, { rows, rowAt: spool.rowAt, more, into });
  } finally {
    spool.close();
    marks?.push(...(spool.waited?.marks('wait for rows', `w${threadId}`) ?? []));
  }
}

/** Renders rows [from, to) of the plan's output into `out`. */
export default function resample(task: ResampleTask): BandOutcome {
  const { src, plan, rows, out, live } = task;
  const marks: Mark[] | undefined = tracing ? [] : undefined;
  const start = marks ? epochNow() : 0;
  let band: PixelRaster;
  // The band's rows are written straight into the shared output, not into an array of this
  // thread's first (one allocation and copy of the band less per task).
  const rowSamples = plan.targetWidth * src.channels;
  const into = view(out, src.depth, plan.targetHeight * rowSamples).subarray(rows[0] * rowSamples, rows[1] * rowSamples);
  try {
    band = render(src, plan, rows, into, live, marks);
  } catch (e) {
    if (e instanceof SpoolReadError) return { kind: 'spool', fault: e.fault, detail: e.message };
    throw e;
  }
  // This thread's handle on a large shared source would keep it mapped until the thread next
  // collects garbage, which an idle thread may not do for minutes: collect after this task
  // (once piscina has let go of it; pool/threads.ts keeps its threads off Atomics.wait for that).
  if ('buffer' in src && src.buffer.byteLength >= HAND_BACK_MIN_BYTES) handBack();
  if (!marks) return { kind: 'done', rows: band.height };
  marks.unshift({ what: `band ${rows[0]}-${rows[0] + band.height} (${plan.targetWidth} px, pyramid ${plan.x.pyramidLevels})`, thread: `w${threadId}`, start, end: epochNow() });
  return { kind: 'done', rows: band.height, marks };
}
