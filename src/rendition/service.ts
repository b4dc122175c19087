import type { CacheEntry } from '../cache/types.js';
import { formatPlanHeader } from '../core/index.js';
import type { Plan } from '../core/types.js';
import { formatSpecs, type OutputFormat } from '../codec/formats.js';
import { negotiateAnimated, negotiateFormat } from '../codec/negotiate.js';
import type { SourceIdentity } from '../origins/types.js';
import { canonicalQuery } from '../schemas/canonical.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { withDeadline } from '../lib/deadline.js';
import { formatKey } from './format-key.js';
import { renditionKey, strongEtag } from './key.js';
import { checkRequestedSize, clampedHeader } from './plan.js';
import { admitRendition } from './admit.js';
import type { Lease } from '../pool/budget.js';
import { type LoadedSource, type ReadSource, readSource } from './source.js';
import { encodeSmallest, fallbackFormat } from './smallest.js';
import { StageClock, type StageTiming } from './timings.js';
import { collectMarks } from '../pool/trace-scope.js';
import type { Mark } from '../pool/trace.js';
import type { RenderContext, RenditionContextInternal } from './context.js';
import { givenSource, resampleSource } from './resample.js';

export type { RenderContext } from './context.js';

export interface Rendition {
  entry: CacheEntry;
  /** 'hit-memory', 'hit-disk', ... or 'miss' (also for requests that joined a render). */
  cache: string;
  timings: StageTiming[];
  key: string;
  /** With FOLDWISE_TIMELINE=1: the render's spans on every thread (src/pool/trace.ts). */
  marks: Mark[];
}

async function produce(
  ctx: RenditionContextInternal,
  path: string,
  q: RenditionQuery,
  accept: string | undefined,
): Promise<{ entry: CacheEntry; identity: SourceIdentity }> {
  // The origin read comes before admission: a slow upstream holds no memory budget. While no
  // job can start at once, a place in the wait line is reserved first, without reading: a
  // request that finds the line full waits for a place in the lobby, unread, and is refused
  // before its source is read when the lobby is full too or no place comes in time.
  const place = ctx.admitted ? undefined : await ctx.pool.enter(ctx.signal);
  let source: LoadedSource | ReadSource;
  let lease: Lease | undefined;
  try {
    const given = givenSource(ctx, q);
    const kept = ctx.sources && { memo: ctx.sources, asked: ctx.asked };
    source = given ?? (await readSource(ctx.origin, path, ctx.limits, ctx.clock, ctx.signal, kept));
    ctx.signal?.throwIfAborted();
    lease = ctx.admitted ? undefined : await admitRendition(ctx, given ? given.decoded : source as ReadSource, q, accept, place);
  } finally {
    // Given back when the job ended before asking for memory (a failed read, a bad header, a refusal); else a no-op.
    place?.release();
  }
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
    // A streamed render's spool file went while it was encoded: gone before the answer.
    await done.cleaned;
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
  return collectMarks(clock.marks, () => rendered(ctx, clock, path, query, accept, canonical));
}

async function rendered(ctx: RenderContext, clock: StageClock, path: string, query: RenditionQuery, accept: string | undefined, canonical: string): Promise<Rendition> {
  const identity = await clock.time('origin', () => ctx.identities?.identify(path) ?? ctx.origin.identify(path));
  const fmt = formatKey(query, accept);
  const key = renditionKey(identity, canonical, fmt);
  const hit = await clock.time('cache', () => ctx.cache.get(key));
  if (hit) {
    ctx.onLookup?.(`hit-${hit.tier}`);
    return { entry: hit.entry, cache: `hit-${hit.tier}`, timings: clock.timings, key, marks: clock.marks };
  }
  ctx.onLookup?.('miss');
  if (ctx.shedding) throw ctx.shedding;
  // The render's signal aborts once no caller waits for it any more (the flight counts them).
  // With answerFirst this caller is answered once the bytes are made and the memory tier has
  // them; the flight, and the callers and replicas waiting on it (replica-flight.ts reads the
  // shared tier when woken), holds until every tier has them.
  let answer: ((made: CacheEntry) => void) | undefined;
  const early = ctx.answerFirst ? new Promise<CacheEntry>((resolve) => (answer = resolve)) : undefined;
  const flying = ctx.flight.run(key, async (abandoned) => {
    const { entry: made, identity: read } = await produce({ ...ctx, clock, asked: identity, signal: abandoned }, path, query, accept);
    // The source changed between identify and read: file the bytes under what was read.
    const storeKey = read.version === identity.version ? key : renditionKey(read, canonical, fmt);
    if (storeKey !== key) ctx.identities?.forget(path);
    // Noted before it is stored: a crash in between leaves a key with nothing behind it, never the reverse.
    ctx.onStored?.(read.key, storeKey);
    const storing = clock.time('cache', () => ctx.cache.set(storeKey, made));
    answer?.(made);
    await storing;
    return made;
  }, ctx.signal);
  const entry = early ? await Promise.race([early, flying.then((r) => r.value)]) : (await flying).value;
  return { entry, cache: 'miss', timings: clock.timings, key, marks: clock.marks };
}
