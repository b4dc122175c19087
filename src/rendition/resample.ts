import type { PixelRaster, Plan } from '../core/types.js';
import type { Animation } from '../codec/decode.js';
import { frameOf, renderFrames, stackFrames } from '../core/index.js';
import type { SourceIdentity } from '../origins/types.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { SharedRaster } from '../pool/worker.js';
import type { RenditionContextInternal } from './context.js';
import { type PlannedRendition, planRendition } from './plan.js';
import { decodeSource, type LoadedSource, type ReadSource, servesWish, wishOf } from './source.js';
import { resampleWhileDecoding } from './streamed.js';
import { shrinks } from './prefilter.js';

/** A rendition resampled and not yet encoded: what outlives the source's pixels. */
export interface Resampled {
  raster: PixelRaster;
  layout: PlannedRendition['layout'];
  plan: Plan;
  hasAlpha: boolean;
  identity: SourceIdentity;
  /** Set when the source's frames were kept: the raster stacks the resampled frames. */
  animation?: Animation;
  /** limits.renderTimeoutMs from the end of planning: covers resample and encode. */
  deadline: AbortSignal;
  /** A streamed render's spool file removal (streamed.ts), to await before answering. */
  cleaned?: Promise<void>;
}

/** The caller's decoded source when it is the version asked for, decoded as the query wishes. */
export function givenSource(ctx: RenditionContextInternal, q: RenditionQuery): LoadedSource | undefined {
  const given = ctx.decoded;
  return given && servesWish(given.decoded, wishOf(q)) && given.identity.key === ctx.asked.key && given.identity.version === ctx.asked.version ? given : undefined;
}

/** The given source, else `read` decoded now (or resampled while it decodes: streamed). */
async function decodedSource(ctx: RenditionContextInternal, source: LoadedSource | ReadSource, q: RenditionQuery): Promise<LoadedSource | Resampled> {
  if ('decoded' in source) return source;
  const read = source;
  const streamed = await resampleWhileDecoding(ctx, read, q);
  if (streamed) return { ...streamed, hasAlpha: false, identity: read.identity };
  return decodeSource(read, ctx.limits, ctx.clock, wishOf(q));
}

/**
 * The pixel-holding stages (decode, plan, resample), overlapped where they can be
 * (streamed.ts), else one after the other. The decoded source lives only in this frame.
 */
export async function resampleSource(ctx: RenditionContextInternal, read: LoadedSource | ReadSource, q: RenditionQuery): Promise<Resampled> {
  const source = await decodedSource(ctx, read, q);
  ctx.signal?.throwIfAborted();
  if ('raster' in source) return source;
  const { decoded, identity } = source;
  const { animation } = decoded;
  const frames = animation?.frames ?? 1;
  const whole = decoded.raster;
  // An animation is planned on one frame, and its content-adaptive prefilter comes from the
  // first frame's spectrum (the alias-risk report says so).
  const src = frames > 1 ? frameOf(whole, frames, 0) : whole;
  const deadline = AbortSignal.timeout(ctx.limits.renderTimeoutMs);
  const stop = ctx.signal ? AbortSignal.any([ctx.signal, deadline]) : deadline;
  let planned = planRendition(src, q, ctx.limits);
  const adaptive = q.prefilter === 'auto' && shrinks(planned.plan) ? ctx.adaptive : undefined;
  // The content-adaptive plan: from the kept spectrum, else the pool analyses the staged pixels.
  const plan = !adaptive ? planned.plan : async (staged: SharedRaster) => {
    const decide = async (p: Plan) => {
      const known = await adaptive.known(p, identity, stop);
      return known ? known.filter : adaptive.analyse(staged, p, identity, stop);
    };
    planned = (await planRendition(src, q, ctx.limits, { decide })) ?? planned;
    return planned.plan;
  };
  const raster = await ctx.clock.time('resample', async () => {
    if (frames === 1) return ctx.pool.resample(whole, plan, stop);
    if (typeof plan !== 'function') return renderFrames(whole, frames, (f) => ctx.pool.resample(f, plan, stop));
    // The first frame settles the plan (its spectrum decides); every other frame follows it.
    const head = await ctx.pool.resample(src, plan, stop);
    const rest = Array.from({ length: frames - 1 }, (_, i) => ctx.pool.resample(frameOf(whole, frames, i + 1), planned.plan, stop));
    return stackFrames([head, ...(await Promise.all(rest))]);
  });
  if (whole.gamut) raster.gamut = whole.gamut;
  const { layout } = planned;
  return { raster, layout, plan: planned.plan, hasAlpha: decoded.hasAlpha, identity, deadline, ...(animation ? { animation } : {}) };
}
