import type { Limits } from '../config.js';
import type { PixelRaster, Plan } from '../core/types.js';
import type { SourceIdentity } from '../origins/types.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { RenderPool, WhileDeciding } from '../pool/render-pool.js';
import type { DecodedShape, KeptDecodes } from '../pool/spool/kept.js';
import { type LiveSpool, liveSpool } from '../pool/spool/live.js';
import { type PlannedRendition, planRendition } from './plan.js';
import { type AdaptivePrefilter, shrinks } from './prefilter.js';
import type { StageClock } from './timings.js';

/** What a streamed render needs of the render context. */
export interface StreamContext {
  pool: RenderPool;
  limits: Limits;
  clock: StageClock;
  /** Aborts when no one waits for the render any more. */
  signal?: AbortSignal;
  adaptive?: AdaptivePrefilter;
  /** Finished decodes kept for the next rendition of their source (src/pool/spool/kept.ts). */
  keptDecodes?: KeptDecodes;
}

/**
 * A spool file to render from: being written while `decoding` is pending, or `finished` before
 * (a kept decode, src/pool/spool/kept.ts: `decoding` has settled, and the render is timed as
 * `resample`, not `stream`, since nothing overlaps).
 */
export interface SpoolAt {
  file: string;
  shape: DecodedShape;
  decoding: Promise<void>;
  finished: boolean;
}

/**
 * prefilter=auto's plan for a streamed render, asked while the render runs on the kernel's
 * plan: from the spectrum kept for the source version (the pool decides), else from the new
 * source's analysis, which reads the tiles' rows from the spool file as they are written (the
 * returned reader, stopped by the caller once the render is over). No decision when
 * nothing is asked (not prefilter=auto, nothing shrinks).
 */
function adaptedPlan(ctx: StreamContext, first: PlannedRendition, at: SpoolAt, q: RenditionQuery, identity: SourceIdentity, signal: AbortSignal): { deciding?: Promise<PlannedRendition | null>; live: { spool?: LiveSpool } } {
  const live: { spool?: LiveSpool } = {};
  const { adaptive } = ctx;
  if (q.prefilter !== 'auto' || !adaptive || !shrinks(first.plan)) return { live };
  const decide = async (plan: Plan) => {
    const known = await adaptive.known(plan, identity, signal);
    if (known) return known.filter;
    live.spool = liveSpool(at.file, at.shape, at.decoding);
    return adaptive.analyse(live.spool.raster, plan, identity, signal);
  };
  const deciding = planRendition(at.shape, q, ctx.limits, { decide });
  return { deciding, live };
}

/**
 * Renders `q` from the spool file `at` on the pool, while it is written (or after: renderFinished): the kernel's
 * plan (`first`) renders at once, and prefilter=auto's content-adaptive decision is asked
 * meanwhile. When it adapts the plan while the source still decodes, that render is called
 * off (its rows stay in the spool file) and the adapted one starts; after, the adapted one
 * follows it. Called off as a failed decode stops a render (its threads stop reading, and live
 * on): aborting a running pool task would end its thread, and a new one takes hundreds of
 * milliseconds to start. Either way the bytes are those of the decode-then-resample path for
 * the plan decided. The analysis reading the file is over when this settles.
 */
export async function renderSpoolFile(
  ctx: StreamContext,
  at: SpoolAt,
  first: PlannedRendition,
  q: RenditionQuery,
  identity: SourceIdentity,
  stop: AbortSignal,
): Promise<PlannedRendition & { raster: PixelRaster }> {
  if (at.finished) return renderFinished(ctx, at, first, q, identity, stop);
  const speculative = new AbortController();
  const calledOff = new Promise<never>((_, reject) => speculative.signal.addEventListener('abort', () => reject(speculative.signal.reason), { once: true }));
  calledOff.catch(() => undefined);
  let asked: ReturnType<typeof adaptedPlan> = { live: {} };
  const stopAsked = () => asked.live.spool?.stop();
  stop.addEventListener('abort', stopAsked, { once: true });
  try {
    // The render's band tasks go to the pool first (the call queues them at once), then the decision's.
    const streaming = ctx.clock.time('stream', () => ctx.pool.resampleSpooled(at.file, at.shape, Promise.race([at.decoding, calledOff]), first.plan, stop));
    asked = adaptedPlan(ctx, first, at, q, identity, stop);
    const { deciding } = asked;
    deciding?.then((a) => a?.adaptive && speculative.abort(), () => undefined);
    let raster: PixelRaster | undefined;
    try {
      raster = await streaming;
    } catch (e) {
      if (!speculative.signal.aborted) throw e;
    }
    // What the decision adds after the render (timed as `plan`; absent when none was asked).
    const adapted = deciding && (await ctx.clock.time('plan', () => deciding));
    if (!adapted?.adaptive) return { ...first, raster: raster! };
    return { ...adapted, raster: await ctx.clock.time('resample', () => ctx.pool.resampleSpooled(at.file, at.shape, at.decoding, adapted.plan, stop)) };
  } finally {
    // The analysis reads the file: it must be done before the file goes (a render that failed
    // calls it off first, rather than let it wait for the rest of the decode).
    stopAsked();
    stop.removeEventListener('abort', stopAsked);
    await asked.deciding?.catch(() => undefined);
  }
}

/**
 * A finished file (a kept decode) has no decode to overlap, but the decision to overlap with:
 * prefilter=auto's decision (from the kept spectrum: a few milliseconds in the pool; else an
 * analysis of the file) is made on one thread while one band renders the kernel's plan on the
 * other. A decision that keeps the plan hands that band's rest to the freed thread; one that
 * adapts it calls the band off where it is (rest-band.ts), and the plan decided is rendered,
 * so little is thrown away (a render on the kernel's plan run to its end beside the decision
 * was: the 14.7 MP bench picture to 640 px took 150 ms, then 56-95 ms decided first). With one
 * thread the decision would queue behind the band: it is made first.
 */
async function renderFinished(ctx: StreamContext, at: SpoolAt, first: PlannedRendition, q: RenditionQuery, identity: SourceIdentity, stop: AbortSignal): Promise<PlannedRendition & { raster: PixelRaster }> {
  const render = (planned: PlannedRendition, finished: boolean | WhileDeciding = true) =>
    ctx.clock.time('resample', () => ctx.pool.resampleSpooled(at.file, at.shape, at.decoding, planned.plan, stop, finished));
  const asked = adaptedPlan(ctx, first, at, q, identity, stop);
  try {
    const { deciding } = asked;
    if (!deciding) return { ...first, raster: await render(first) };
    if (ctx.pool.threads < 2) {
      const adapted = await ctx.clock.time('plan', () => deciding);
      const planned = adapted?.adaptive ? adapted : first;
      return { ...planned, raster: await render(planned) };
    }
    const decided = ctx.clock.time('plan', () => deciding);
    // A failed decision calls the band off too (its error is thrown below).
    const adapts = decided.then((a) => Boolean(a?.adaptive), () => true);
    const beside = render(first, { callOff: adapts });
    // Awaited below once decided; a band that fails while the decision runs must not be an unhandled rejection meanwhile.
    beside.catch(() => undefined);
    if (!(await adapts)) return { ...first, raster: await beside };
    await beside.catch(() => undefined);
    const adapted = (await decided)!;
    return { ...adapted, raster: await render(adapted) };
  } finally {
    asked.live.spool?.stop();
  }
}
