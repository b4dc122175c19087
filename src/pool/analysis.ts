/**
 * The worker side of prefilter=auto: the spectrum analysis of a staged source and the
 * content-adaptive filter of a plan, run in the pool's threads so the event loop never waits
 * on them (a 12 MP analysis and its decision take tens of milliseconds). Imports the core and
 * the spool reader only, as worker.ts does.
 */
import { planResponseOf } from '../core/index.js';
import { adaptiveFilter, analyzeSpectrum, planGains, type PlanGains, type SourceSpectrum } from '../core/risk/index.js';
import { layoutTiles } from '../core/spectrum/tiles.js';
import type { AdaptiveFilter, PixelRaster, Plan } from '../core/types.js';
import { threadId } from 'node:worker_threads';
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

/** adaptiveFilter with the plan's own weight tables as its response (`gains`: planGains of them, made before). */
export function decide(spectrum: SourceSpectrum, plan: Plan, gains?: PlanGains): AdaptiveFilter | undefined {
  return adaptiveFilter(spectrum, plan, planResponseOf(plan), gains);
}

/** The source rows the Welch tiles read (tiles.ts's layout): sorted, without repeats. */
export function tileRows(width: number, height: number): number[] {
  const layout = layoutTiles(width, height);
  const rows = new Set<number>();
  for (let k = 1; k < layout.corners.length; k += 2) {
    for (let y = layout.corners[k]; y < layout.corners[k] + layout.tileSize; y++) rows.add(y);
  }
  return [...rows].sort((a, b) => a - b);
}

/**
 * The spectrum of a spool file's source, analysed as its rows arrive: the tiles of a band are
 * read as soon as libvips has written their rows (SpoolRows waits for them), so the analysis
 * ends shortly after the last row, not a whole analysis later. The raster has the file's size
 * but holds only the rows the tiles read; the rest stays zero and is never touched, so its
 * pages are never made resident (a fresh large buffer is zero-filled by the system on first
 * touch): a 14.7 MP source costs the analysis about 10 MB, not 44. test/pool/analysis.test.ts
 * checks the spectrum equals the one of the whole raster.
 */
function spooledSpectrum(src: SpooledRaster, marks?: Mark[]): SourceSpectrum {
  const { width, height, channels, depth } = src;
  const n = width * channels;
  const data = depth === 16 ? new Uint16Array(n * height) : new Uint8Array(n * height);
  const rows = tileRows(width, height);
  let next = 0;
  const spool = new SpoolRows(src.path, src, new Int32Array(src.state));
  try {
    const ready = (rowEnd: number) => {
      for (; next < rows.length && rows[next] < rowEnd; next++) {
        const row = spool.rowAt(rows[next]);
        data.set(row.data.subarray(row.at, row.at + n), rows[next] * n);
      }
    };
    return analyzeSpectrum({ data, width, height, channels }, { ready });
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
  const gains = plan ? planGains(plan, planResponseOf(plan), layoutTiles(src.width, src.height).tileSize) : undefined;
  span('analysis: plan response', t);
  t = marks ? epochNow() : 0;
  const spectrum = 'buffer' in src ? analyzeSpectrum(rasterOf(src)) : spooledSpectrum(src, marks);
  span('analysis: spectrum', t);
  t = marks ? epochNow() : 0;
  const filter = plan ? decide(spectrum, plan, gains) : undefined;
  span('analysis: decision', t);
  return marks ? { spectrum, filter, marks } : { spectrum, filter };
}

/** The piscina task: decide for the plan from a known spectrum. */
export function adaptTask(task: AdaptTask): AdaptiveFilter | undefined {
  return decide(task.spectrum, task.plan);
}
