/**
 * The alias-risk service: one report of a source and a rendition query, as the HTTP route and
 * the CLI both give it (neither goes through the other). The source's spectrum is analysed
 * once per version (spectrum-store.ts): identified, read, admitted, decoded and analysed here
 * when it is not known yet; then the query is planned as the render plans it and assessed.
 * Also prefilter=auto's hooks for the render paths (adaptivePrefilter): the same store, with
 * the analysis and the decision in the pool's threads.
 */
import { kernelNames, planResponseOf } from '../core/index.js';
import type { SourceSpectrum } from '../core/risk/index.js';
import { readHeader } from '../codec/header.js';
import { decodeCost } from '../pool/cost.js';
import type { RenderPool } from '../pool/render-pool.js';
import { checkRequestedSize } from '../rendition/plan.js';
import { type AdaptivePrefilter, shrinks } from '../rendition/prefilter.js';
import { renderRendition, type RenderContext } from '../rendition/service.js';
import { decodeLimits, decodeSource, readSource } from '../rendition/source.js';
import { StageClock } from '../rendition/timings.js';
import type { RiskView } from '../schemas/alias-risk.js';
import { compileRenditionQuery, type RenditionQuery } from '../schemas/rendition.js';
import { decodeRgb, encodePng, riskMap, spectrumPicture } from './pictures/index.js';
import { type AssessedRendition, assessRendition, riskBody } from './report.js';
import type { SpectrumStore } from './spectrum-store.js';
import { analyseIntoKept } from './kept-analysis.js';

/** Width of the source preview under view=map (output px): enough to read a 8 x 6 grid. */
const MAP_WIDTH = 640;

export interface RiskContext {
  /** The render context: origin, identities, pool, limits, stage metrics; the map's preview render. */
  render: RenderContext;
  spectra: SpectrumStore;
}

/** A query assessed on a source's spectrum, with where the spectrum came from and the stage times. */
export interface AssessedSource {
  path: string;
  spectrum: SourceSpectrum;
  assessed: AssessedRendition;
  /** Where the spectrum came from (spectrum-store.ts: memory, shared, analysed). */
  from: string;
  clock: StageClock;
  analyseMs: number;
  assessMs: number;
}

/**
 * Assesses `q` on the spectrum of the source at `path`.
 *
 * @throws FoldwiseError for every refusal (not found, limits, overload, decode failures).
 */
export async function assessSource(ctx: RiskContext, path: string, q: RenditionQuery): Promise<AssessedSource> {
  const { render } = ctx;
  checkRequestedSize(q, render.limits);
  const clock = new StageClock(render.observe);
  const identity = await clock.time('origin', () => render.identities?.identify(path) ?? render.origin.identify(path));
  let analyseMs = 0;
  const { spectrum, from } = await ctx.spectra.get(identity, async (analyse, made) => {
    // Read before admission; admitted for the decode and as much again for the analysis (an allowance).
    const kept = render.sources && { memo: render.sources, asked: identity };
    const read = await readSource(render.origin, path, render.limits, clock, undefined, kept);
    const header = await readHeader(read.bytes, decodeLimits(render.limits));
    const lease = await render.pool.admit(2 * decodeCost(header), `analysing a ${header.width}x${header.height} source`);
    try {
      // Through a spool file kept for the renditions that follow, where the render path would spool it.
      const spooled = await analyseIntoKept(render, read, clock, made);
      if (spooled) {
        analyseMs = spooled.analyseMs;
        return spooled.spectrum;
      }
      // The source's own gamut (luminance with its primaries' coefficients); an animation's first frame.
      const { decoded } = await decodeSource(read, render.limits, clock, { gamut: 'source', frames: 0 });
      const start = performance.now();
      const s = await analyse(decoded.raster);
      analyseMs = performance.now() - start;
      return s;
    } finally {
      lease.release();
    }
  });
  const start = performance.now();
  const assessed = assessRendition(spectrum, q, render.limits);
  return { path, spectrum, assessed, from, clock, analyseMs, assessMs: performance.now() - start };
}

/** The report in one view: the JSON body, the risk map over a preview, or the spectrum picture. */
export async function riskAnswer(ctx: RiskContext, a: AssessedSource, view: RiskView): Promise<{ body: Buffer; type: string }> {
  const { spectrum, assessed } = a;
  if (view === 'json') return { body: Buffer.from(JSON.stringify(riskBody(a.path, spectrum, assessed))), type: 'application/json; charset=utf-8' };
  if (view === 'spectrum') return { body: await encodePng(spectrumPicture(spectrum, assessed.report, planResponseOf(assessed.plan))), type: 'image/png' };
  const preview = compileRenditionQuery({ maxDimension: ctx.render.limits.maxDimension, kernelNames });
  const width = String(Math.min(MAP_WIDTH, spectrum.width));
  const shown = await renderRendition(ctx.render, a.path, preview.parse({ width, format: 'jpeg' }));
  const picture = riskMap(await decodeRgb(shown.entry.body), assessed.report, spectrum, assessed.plan.crop);
  return { body: await encodePng(picture), type: 'image/png' };
}

/**
 * prefilter=auto's hooks for the render paths (src/rendition/prefilter.ts), backed by `store`
 * and `pool`: both the analysis and the decision run in the pool's threads (src/pool/analysis.ts),
 * tens of milliseconds each for a large source, which the event loop must not wait through.
 * A source version analysed right now counts as known: concurrent first requests of other
 * widths decide from that one analysis instead of each analysing the source again.
 */
export function adaptivePrefilter(store: SpectrumStore, pool: RenderPool): AdaptivePrefilter {
  const running = new Map<string, Promise<SourceSpectrum>>();
  return {
    async known(plan, identity, signal) {
      if (!shrinks(plan)) return { filter: undefined };
      const spectrum = (await store.lookup(identity)) ?? (await running.get(store.keyOf(identity))?.catch(() => undefined));
      return spectrum ? { filter: await pool.adapt(spectrum, plan, signal) } : null;
    },
    async analyse(src, plan, identity, signal) {
      if (!shrinks(plan)) return undefined;
      const key = store.keyOf(identity);
      const task = pool.analyse(src, plan, signal);
      const spectrum = task.then((a) => a.spectrum);
      running.set(key, spectrum);
      // Kept in memory (below) before it leaves `running`; a failed one leaves joiners to analyse.
      void spectrum.catch(() => undefined).finally(() => running.get(key) === spectrum && running.delete(key));
      const { spectrum: made, filter } = await task;
      // Kept in memory at once; the shared tiers are written in the background.
      void store.keep(identity, made);
      return filter;
    },
  };
}
