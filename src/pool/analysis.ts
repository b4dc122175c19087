/**
 * The worker side of prefilter=auto: the spectrum analysis of a staged source and the
 * content-adaptive filter of a plan, run in the pool's threads so the event loop never waits
 * on them (a 12 MP analysis and its decision take tens of milliseconds). Imports the core and
 * the spool reader (and lru-cache for the kept responses), as worker.ts does.
 */
import { planResponseOf } from '../core/index.js';
import { adaptiveFilter, analyzeSpectrum, planGains, type PlanGains, type SourceSpectrum } from '../core/risk/index.js';
import { layoutTiles } from '../core/spectrum/tiles.js';
import type { AdaptiveFilter, PixelRaster, Plan } from '../core/types.js';
import { threadId } from 'node:worker_threads';
import { LRUCache } from 'lru-cache';
import { SpoolRows } from './spool/rows.js';
import { epochNow, type Mark, tracing } from './trace.js';
import type { SharedRaster, SpooledRaster } from './worker.js';

/** Analyse a source in shared memory or a spool file; decide prefilter=auto's filter for `plan`. */
export interface AnalyseTask {
  src: SharedRaster | SpooledRaster;
  /** The plan to decide for; none for the spectrum alone. */
  plan?: Plan;
}

export interface Analysed {
  spectrum: SourceSpectrum;
  /** adaptiveFilter's answer for the task's plan (undefined: the plan stays as it is, or none was given). */
  filter: AdaptiveFilter | undefined;
  /** With FOLDWISE_TIMELINE=1 (trace.ts): the task's spans on its thread. */
  marks?: Mark[];
}

/** Decide prefilter=auto's filter for `plan` from a spectrum analysed before. */
export interface AdaptTask {
  spectrum: SourceSpectrum;
  plan: Plan;
}

/** adaptiveFilter with the plan's own weight tables as its response, sampled once per thread (gainsOf). */
export function decide(spectrum: SourceSpectrum, plan: Plan): AdaptiveFilter | undefined {
  return adaptiveFilter(spectrum, plan, planResponseOf(plan), gainsOf(plan, spectrum.tileSize));
}

/**
 * Plans whose sampled response this thread keeps. The response depends on the plan alone (its
 * sizes, crop, kernel, sigma, pyramid, cut-off) and the spectrum's tile size, not on the pixels,
 * and a site's pictures come in a few sizes, each asked at the same widths (a srcset ladder):
 * so every picture after the first of its size finds its plans' responses made. Making one took
 * 1.7-8.4 ms of a new picture's analysis (scripts/bench/timeline.ts, 'analysis: plan
 * response'), and an adapt task (a further width) made it each time: with them kept, `npx tsx
 * scripts/bench/cpu.ts --pictures 10` (ten new 4 MP pictures of one size, four runs per tree,
 * interleaved) gave the pool's threads 102 -> 89 ms of CPU per first rendition and 117.5 -> 93
 * ms per further width (medians). A response holds two tables of at most a few hundred numbers.
 */
const GAINS_KEPT = 64;
const gainsMade = new LRUCache<string, PlanGains>({ max: GAINS_KEPT });

/**
 * planGains of `plan` at `tileSize`, made once per thread while among the GAINS_KEPT last used;
 * undefined for a source too small for tiles (tileSize 0), which adaptiveFilter then samples.
 */
export function gainsOf(plan: Plan, tileSize: number): PlanGains | undefined {
  if (!(tileSize > 0)) return undefined;
  // The whole plan is the key (its reason line too, which follows from the rest).
  const key = `${tileSize} ${JSON.stringify(plan)}`;
  let gains = gainsMade.get(key);
  if (!gains) {
    gains = planGains(plan, planResponseOf(plan), tileSize);
    gainsMade.set(key, gains);
  }
  return gains;
}

/**
 * The spectrum of a spool file's source, analysed as its rows arrive: each Welch tile's rows
 * are read straight from the file through the reader's block (SpoolRows waits for rows not yet
 * written), so the analysis ends shortly after the last row, and nothing the size of the
 * source is made. A fresh raster of that size for each new source (12 MB at 4 MP, 44 MB at
 * 14.7 MP), of which the tiles' rows were copied, had V8 run a full collection in the
 * analysing thread on nearly every new picture (`node --trace-gc`, 8 new 4 MP pictures: 7
 * mark-compacts, 39 ms, then none), and an analysis of a written 14.7 MP file took 25-27 ms,
 * now 8.5-9.4 (4 MP: 10-11, now about 8.3). The block holds a tile's rows at least, so the
 * tiles of one band are read from it once. test/pool/analysis.test.ts compares with the
 * whole raster's spectrum.
 */
function spooledSpectrum(src: SpooledRaster, marks?: Mark[]): SourceSpectrum {
  const { width, height, channels } = src;
  const spool = new SpoolRows(src.path, src, new Int32Array(src.state), layoutTiles(width, height).tileSize);
  try {
    return analyzeSpectrum({ data: new Uint8Array(0), width, height, channels }, { rowAt: spool.rowAt });
  } finally {
    spool.close();
    marks?.push(...(spool.waited?.marks('wait for rows', `w${threadId}`) ?? []));
  }
}

function rasterOf(src: SharedRaster): PixelRaster {
  const { buffer, width, height, channels, depth } = src;
  const length = width * height * channels;
  const data = depth === 16 ? new Uint16Array(buffer, 0, length) : new Uint8Array(buffer, 0, length);
  const raster: PixelRaster = { data, width, height, channels };
  // A wide-gamut source's luminance takes its own primaries' coefficients (spectrum/luminance.ts);
  // an animation's frame count goes into the spectrum, for the report.
  if (src.gamut) raster.gamut = src.gamut;
  if (src.sourceFrames !== undefined) raster.sourceFrames = src.sourceFrames;
  return raster;
}

/**
 * The piscina task: analyse, then decide for the plan. The plan's sampled response, which the
 * decision needs and which does not depend on the pixels, is made first: for a spool file
 * still being written, while its rows arrive.
 */
export function analyseTask(task: AnalyseTask): Analysed {
  const { src, plan } = task;
  const marks: Mark[] | undefined = tracing ? [] : undefined;
  const span = (what: string, start: number) => marks?.push({ what, thread: `w${threadId}`, start, end: epochNow() });
  let t = marks ? epochNow() : 0;
  // Made (and kept) while the rows arrive: the decision below finds it.
  if (plan) gainsOf(plan, layoutTiles(src.width, src.height).tileSize);
  span('analysis: plan response', t);
  t = marks ? epochNow() : 0;
  const spectrum = 'buffer' in src ? analyzeSpectrum(rasterOf(src)) : spooledSpectrum(src, marks);
  span('analysis: spectrum', t);
  t = marks ? epochNow() : 0;
  const filter = plan ? decide(spectrum, plan) : undefined;
  span('analysis: decision', t);
  return marks ? { spectrum, filter, marks } : { spectrum, filter };
}

/** The piscina task: decide for the plan from a known spectrum. */
export function adaptTask(task: AdaptTask): AdaptiveFilter | undefined {
  return decide(task.spectrum, task.plan);
}
