/**
 * The worker side of a warm start (RenderPool.warm): each thread renders, analyses and decides
 * before the service says it is ready, on the spool file the main thread wrote (as a streamed
 * render of a new source does: rows read from the file, two plans, one with a pyramid, the
 * analysis of the file's tiles), so the first request finds the thread's modules loaded, the
 * SIMD kernels and the hot functions compiled at the sizes requests use (the largest tiles).
 */
import { makePlan, renderRaster } from '../core/index.js';
import { planTable } from '../core/resample/index.js';
import type { PixelRaster } from '../core/types.js';
import { analyseTask, decide } from './analysis.js';
import { analyzeSpectrum, type SourceSpectrum } from '../core/risk/index.js';
import { SpoolReadError, SpoolRows, WRITTEN } from './spool/rows.js';
import type { SpooledRaster } from './worker.js';

export interface WarmTask {
  /** Int32Array buffer: threads that have warmed so far. */
  arrived: SharedArrayBuffer;
  /** Threads in the pool: each task waits (bounded) until that many have arrived. */
  threads: number;
  /** An 8-bit RGB spool file fully written (codec/warm.ts), when the pool spools. */
  spooled?: { path: string; width: number; height: number };
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

const planOf = (width: number, height: number, factor: number) =>
  makePlan({ sourceWidth: width, sourceHeight: height, targetWidth: Math.round(width / factor), targetHeight: Math.round(height / factor), kernel: 'auto', prefilter: 'auto', light: 'linear' });

/** Renders 8x (a pyramid level, then the final stage) and 2.7x (the final stage alone), analyses and decides. */
function warmSpooled(spooled: NonNullable<WarmTask['spooled']>): void {
  const state = new Int32Array(new SharedArrayBuffer(4));
  state[0] = WRITTEN;
  const src: SpooledRaster = { ...spooled, channels: 3, depth: 8, state: state.buffer as SharedArrayBuffer };
  const { width, height } = spooled;
  for (const factor of [8, 2.7]) {
    const rows = new SpoolRows(src.path, src, state);
    try {
      renderRaster({ data: new Uint8Array(0), width, height, channels: 3 }, planOf(width, height, factor), { rowAt: rows.rowAt });
    } finally {
      rows.close();
    }
  }
  warmAnalyses((factor) => analyseTask({ src, plan: planOf(width, height, factor) }).spectrum, width, height);
  warmTables();
}

/**
 * Output widths whose weight tables (each axis, with its central lobes) each thread makes for a
 * 4608 x 3456 source and drops. The warm picture's own tables are a few hundred rows long, too
 * short for V8 to optimise the loops that make them (buildWeights, centralLobes), so a first
 * request of 800 px compiled them on V8's helper threads (`node --trace-opt`: centralLobes
 * 3-16 ms in three of five starts, besides the analysis's). With these (about 10 ms a thread),
 * the first request's compiles were 2-3 ms (one row reader) in four of five starts, 21 ms in
 * the fifth (foldMargin of the decision as well), against 3-36 ms without them.
 */
const TABLE_WIDTHS = [800, 532, 1024];
const TABLE_SOURCE = [4608, 3456] as const;

/** Makes both axes' tables of TABLE_WIDTHS; answers how many came with central lobes (limit.ts). */
export function warmTables(): number {
  let lobed = 0;
  for (const width of TABLE_WIDTHS) {
    const plan = planOf(TABLE_SOURCE[0], TABLE_SOURCE[1], TABLE_SOURCE[0] / width);
    for (const axis of ['x', 'y'] as const) if (planTable(plan, axis).lobe) lobed++;
  }
  return lobed;
}

/**
 * The scale factors each thread analyses and decides the warm picture for, in this order. Both
 * plans are decided: the sampled response of a plan without a pyramid (2.7x, a wide final
 * kernel) took ~50 ms on a first request when only the 8x one was warmed (scripts/bench/
 * timeline.ts, 'analysis: plan response'), against 1-15 ms once compiled. And more than once:
 * V8 optimises analyzeSpectrum and the decision's loops (foldCells, foldMargin, findPeaks) only
 * after several calls, and compiles a function so marked at its next call. With one analysis
 * of each, the first request after start compiled them (`node --trace-opt`, 4 starts:
 * analyzeSpectrum 42-53 ms of TurboFan work in three, foldCells 55 ms in the fourth, on V8's
 * helper threads) while running them unoptimised: its V8 helpers took 17-33 ms of CPU against
 * 3-4 ms for the next request. With these (and the decisions made once more on a copy of the
 * spectrum as an adapt task receives it, whose objects V8 sees apart), 3-22 ms of compiles were
 * left in 5 starts, and the first request took 128 ms against 140 (medians of 10 starts each,
 * interleaved), its CPU 220 ms against 239; the threads are warm about 0.25 s later.
 */
const ANALYSIS_FACTORS = [8, 8, 8, 8, 2.7];

/**
 * Analyses (and decides) through `analyse` at each of ANALYSIS_FACTORS, then decides
 * DECISION_SCALES on the last spectrum and on a structured clone of it. Answers the number of
 * those decisions.
 */
export function warmAnalyses(analyse: (factor: number) => SourceSpectrum, width: number, height: number): number {
  let spectrum: SourceSpectrum | undefined;
  for (const factor of ANALYSIS_FACTORS) spectrum = analyse(factor);
  return warmDecisions(spectrum!, width, height).length + warmDecisions(structuredClone(spectrum!), width, height).length;
}

/**
 * Scale factors decided once more each, from a third of a step to twice the pyramid's: the
 * decision's code (the plan's sampled response above all) is compiled by V8's optimising tier
 * only after enough calls, and two were not enough. With two, a first request's 'analysis:
 * plan response' still took 22-32 ms (12-14 ms of it CPU, /proc/thread-self/schedstat) and the
 * next new picture's 2-4 ms; with these six as well, the first request's took 2.3-2.5 ms.
 */
const DECISION_SCALES = [1.6, 2.3, 3.3, 4.6, 6.5, 11];

/** Decides each of DECISION_SCALES; answers the plans' pyramid levels along x, in that order. */
export function warmDecisions(spectrum: SourceSpectrum, width: number, height: number): number[] {
  return DECISION_SCALES.map((factor) => {
    const plan = planOf(width, height, factor);
    decide(spectrum, plan);
    return plan.x.pyramidLevels;
  });
}

/** The same work on pixels made here (no spool file). */
function warmInMemory(): void {
  const width = 640;
  const height = 480;
  const src: PixelRaster = { data: pattern(width, height), width, height, channels: 3 };
  renderRaster(src, planOf(width, height, 8));
  renderRaster(src, planOf(width, height, 2.7));
  warmAnalyses((factor) => {
    const spectrum = analyzeSpectrum(src);
    decide(spectrum, planOf(width, height, factor));
    return spectrum;
  }, width, height);
  warmTables();
}

/**
 * Warms this thread, then waits until every thread of the pool has taken a warm task: a thread
 * busy waiting takes no other, so `threads` tasks reach `threads` different threads. A spool
 * file that cannot be read warms on pixels made here instead.
 */
export function warmTask(task: WarmTask): number {
  try {
    if (task.spooled) warmSpooled(task.spooled);
    else warmInMemory();
  } catch (e) {
    if (!(e instanceof SpoolReadError)) throw e;
    warmInMemory();
  }
  const arrived = new Int32Array(task.arrived);
  Atomics.add(arrived, 0, 1);
  Atomics.notify(arrived, 0);
  const until = Date.now() + BARRIER_MS;
  for (let n = Atomics.load(arrived, 0); n < task.threads && Date.now() < until; n = Atomics.load(arrived, 0)) {
    Atomics.wait(arrived, 0, n, 50);
  }
  return Atomics.load(arrived, 0);
}
