import type { Flight } from '../lib/single-flight.js';
import type { TieredCache } from '../cache/tiered.js';
import type { CacheEntry } from '../cache/types.js';
import type { Limits } from '../config.js';
import { formatPlanHeader } from '../core/index.js';
import type { PixelRaster, Plan } from '../core/types.js';
import { formatSpecs, type OutputFormat } from '../codec/formats.js';
import { negotiateAnimated, negotiateFormat } from '../codec/negotiate.js';
import type { Animation } from '../codec/decode.js';
import { frameOf, renderFrames, stackFrames } from '../core/index.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import { canonicalQuery } from '../schemas/canonical.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { withDeadline } from '../lib/deadline.js';
import { formatKey } from './format-key.js';
import type { IdentityMemo } from './identity.js';
import { renditionKey, strongEtag } from './key.js';
import { checkRequestedSize, clampedHeader, type PlannedRendition, planRendition } from './plan.js';
import type { RenderPool } from '../pool/render-pool.js';
import type { SharedRaster } from '../pool/worker.js';
import { admitRendition } from './admit.js';
import { decodeSource, type LoadedSource, type ReadSource, readSource, servesWish, wishOf } from './source.js';
import { resampleWhileDecoding } from './streamed.js';
import { type AdaptivePrefilter, shrinks } from './prefilter.js';
import { encodeSmallest, fallbackFormat } from './smallest.js';
import { type Stage, StageClock, type StageTiming } from './timings.js';

/** Everything a render needs; no Fastify request, so ingest and the CLI can call it too. */
export interface RenderContext {
  origin: Origin;
  /** Told of each rendition about to be stored, by its source's key (the index deletion uses). */
  onStored?: (source: string, key: string) => void;
  cache: TieredCache;
  flight: Flight<CacheEntry>;
  pool: RenderPool;
  limits: Limits;
  /** Stage durations, for metrics. */
  observe?: (stage: Stage, seconds: number) => void;
  /** Cache outcome of each call: 'hit-<tier>' or 'miss'. */
  onLookup?: (result: string) => void;
  /** Short-lived memo of source identities (hits then skip the origin); default ask the origin. */
  identities?: IdentityMemo;
  /**
   * Content-adaptive prefilter (alias-risk analysis, src/risk/service.ts), asked only when
   * prefilter=auto and the plan shrinks; it analyses and decides in the pool's threads.
   * Without it prefilter=auto is the kernel's own.
   */
  adaptive?: AdaptivePrefilter;
  /**
   * A source the caller has already read and decoded (the upload hook's ladder, the alias-risk
   * preview): a miss renders from it instead of reading and decoding again, when it is the
   * version of the path asked for.
   */
  decoded?: LoadedSource;
  /**
   * The caller holds a lease of the memory budget covering this render (the upload hook's
   * ladder): the render is not admitted again.
   */
  admitted?: boolean;
  /** Aborts when no one waits for the render any more (every caller gone): ERR_REQUEST_ABANDONED. */
  signal?: AbortSignal;
  /** The refusal a miss gets while the process sheds load (hits are still served), else null. */
  shedding?: Error | null;
}

export interface Rendition {
  entry: CacheEntry;
  /** 'hit-memory', 'hit-disk', ... or 'miss' (also for requests that joined a render). */
  cache: string;
  timings: StageTiming[];
  key: string;
}

/** A rendition resampled and not yet encoded: what outlives the source's pixels. */
interface Resampled {
  raster: PixelRaster;
  layout: PlannedRendition['layout'];
  plan: Plan;
  hasAlpha: boolean;
  identity: SourceIdentity;
  /** Set when the source's frames were kept: the raster stacks the resampled frames. */
  animation?: Animation;
  /** limits.renderTimeoutMs from the end of planning: covers resample and encode. */
  deadline: AbortSignal;
}

/** The caller's decoded source when it is the version asked for, decoded as the query wishes. */
function givenSource(ctx: RenditionContextInternal, q: RenditionQuery): LoadedSource | undefined {
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
async function resampleSource(ctx: RenditionContextInternal, read: LoadedSource | ReadSource, q: RenditionQuery): Promise<Resampled> {
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

async function produce(
  ctx: RenditionContextInternal,
  path: string,
  q: RenditionQuery,
  accept: string | undefined,
): Promise<{ entry: CacheEntry; identity: SourceIdentity }> {
  // The origin read comes before admission: a slow upstream holds no memory budget.
  const given = givenSource(ctx, q);
  const source = given ?? (await readSource(ctx.origin, path, ctx.limits, ctx.clock, ctx.signal));
  ctx.signal?.throwIfAborted();
  const lease = ctx.admitted ? undefined : await admitRendition(ctx, given ? given.decoded : source as ReadSource, q, accept);
  // The lease is held until the encode has really ended (a deadline stops the wait, not libvips).
  let ended: Promise<unknown> = Promise.resolve();
  try {
    const done = await resampleSource(ctx, source, q);
    const { raster, layout, plan, deadline } = done;
    const negotiated = done.animation ? negotiateAnimated(accept) : negotiateFormat(accept, done.hasAlpha);
    const fallback = fallbackFormat(done.animation !== undefined, done.hasAlpha);
    const options = { quality: q.quality, background: q.background, canvas: layout.canvas, animation: done.animation };
    const encoding = encodeSmallest(raster, options, q.format ?? negotiated, q.format === undefined, fallback);
    ended = encoding.catch(() => undefined);
    const { body, format } = await ctx.clock.time('encode', () =>
      withDeadline(encoding, deadline, () => ctx.pool.refusal('ERR_RENDER_TIMEOUT', 'encoding took longer than allowed')),
    );
    return { entry: entryOf(body, format, plan, clampedHeader(layout, q, ctx.limits)), identity: done.identity };
  } finally {
    void ended.then(() => lease?.release());
  }
}

function entryOf(body: Buffer, format: OutputFormat, plan: Plan, clamped: string | undefined): CacheEntry {
  const headers: Record<string, string> = { 'rendition-plan': formatPlanHeader(plan) };
  if (clamped) headers['rendition-clamped'] = clamped;
  return {
    body,
    contentType: formatSpecs[format].contentType,
    etag: strongEtag(body),
    headers,
    createdAt: Date.now(),
  };
}

interface RenditionContextInternal extends RenderContext {
  clock: StageClock;
  /** The identity renderRendition found for the path (the cache key's). */
  asked: SourceIdentity;
}

/**
 * One rendition of `path` for `query`: from the cache when any tier has it, else rendered once
 * however many callers ask at the same time (single-flight), then stored in every tier.
 * `accept` is the request's Accept header (used when format is absent); `canonical` is
 * canonicalQuery(query), for callers that already have it.
 *
 * @throws FoldwiseError for every refusal (not found, limits, overload, decode failures).
 */
export async function renderRendition(
  ctx: RenderContext,
  path: string,
  query: RenditionQuery,
  accept?: string,
  canonical: string = canonicalQuery(query),
): Promise<Rendition> {
  checkRequestedSize(query, ctx.limits);
  const clock = new StageClock(ctx.observe);
  const identity = await clock.time('origin', () => ctx.identities?.identify(path) ?? ctx.origin.identify(path));
  const fmt = formatKey(query, accept);
  const key = renditionKey(identity, canonical, fmt);
  const hit = await clock.time('cache', () => ctx.cache.get(key));
  if (hit) {
    ctx.onLookup?.(`hit-${hit.tier}`);
    return { entry: hit.entry, cache: `hit-${hit.tier}`, timings: clock.timings, key };
  }
  ctx.onLookup?.('miss');
  if (ctx.shedding) throw ctx.shedding;
  // The render's signal aborts once no caller waits for it any more (the flight counts them).
  const { value: entry } = await ctx.flight.run(key, async (abandoned) => {
    const { entry: made, identity: read } = await produce({ ...ctx, clock, asked: identity, signal: abandoned }, path, query, accept);
    // The source changed between identify and read: file the bytes under what was read.
    const storeKey = read.version === identity.version ? key : renditionKey(read, canonical, fmt);
    if (storeKey !== key) ctx.identities?.forget(path);
    // Noted before it is stored: a crash in between leaves a key with nothing behind it, never the reverse.
    ctx.onStored?.(read.key, storeKey);
    await clock.time('cache', () => ctx.cache.set(storeKey, made));
    return made;
  }, ctx.signal);
  return { entry, cache: 'miss', timings: clock.timings, key };
}
