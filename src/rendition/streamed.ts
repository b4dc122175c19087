import type { Limits } from '../config.js';
import type { PixelRaster, Plan } from '../core/types.js';
import { probeSpooledDecode, type SpoolableSource, SpoolWriteError } from '../codec/spool-decode.js';
import type { SourceIdentity } from '../origins/types.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { type PlannedRendition, planRendition } from './plan.js';
import type { RenderPool } from '../pool/render-pool.js';
import { type LiveSpool, liveSpool } from '../pool/spool/live.js';
import { type AdaptivePrefilter, shrinks } from './prefilter.js';
import { decodeLimits, type ReadSource, wishOf } from './source.js';
import type { StageClock } from './timings.js';
import { epochNow } from '../pool/trace.js';

/**
 * Sources smaller than this decode in a few milliseconds, less than the spool file and the
 * row polling cost: they take the in-memory path (`npm run bench`: a 0.12 MP upscale took
 * ~2.5 ms longer streamed, a 4 MP source ~0.3x of its decode time less).
 */
export const STREAM_MIN_PIXELS = 1 << 20;

/** What a streamed render needs of the render context. */
export interface StreamContext {
  pool: RenderPool;
  limits: Limits;
  clock: StageClock;
  /** Aborts when no one waits for the render any more. */
  signal?: AbortSignal;
  adaptive?: AdaptivePrefilter;
}

/** A rendition resampled while its source decoded. */
export interface StreamedRendition extends PlannedRendition {
  raster: PixelRaster;
  /** Started before the decode: covers decode, resample and then the encode. */
  deadline: AbortSignal;
  /**
   * Settles once the spool file is removed: the caller encodes meanwhile and awaits it before
   * it answers (the file's pages, 44 MB for 14.7 MP, take milliseconds to free).
   */
  cleaned: Promise<void>;
}

/**
 * prefilter=auto's plan for a streamed render, asked while the render runs on the kernel's
 * plan: from the spectrum kept for the source version (the pool decides), else from the new
 * source's analysis, which reads the tiles' rows from the spool file as they are written (the
 * returned reader, stopped by the caller once the render is over). No decision when
 * nothing is asked (not prefilter=auto, nothing shrinks).
 */
function adaptedPlan(ctx: StreamContext, first: PlannedRendition, probe: SpoolableSource, file: string, decoding: Promise<void>, q: RenditionQuery, identity: SourceIdentity, signal: AbortSignal): { deciding?: Promise<PlannedRendition | null>; live: { spool?: LiveSpool } } {
  const live: { spool?: LiveSpool } = {};
  const { adaptive } = ctx;
  if (q.prefilter !== 'auto' || !adaptive || !shrinks(first.plan)) return { live };
  const decide = async (plan: Plan) => {
    const known = await adaptive.known(plan, identity, signal);
    if (known) return known.filter;
    live.spool = liveSpool(file, probe, decoding);
    return adaptive.analyse(live.spool.raster, plan, identity, signal);
  };
  const deciding = planRendition(probe, q, ctx.limits, { decide });
  return { deciding, live };
}

/**
 * Renders `q` from `source` with the decode and the resample overlapped: libvips writes the
 * decoded rows to a spool file (src/codec/spool-decode.ts) and the pool's workers resample
 * them as they arrive (RenderPool.resampleSpooled), so the rendition is ready soon after the
 * last row is decoded instead of a whole resample later. The header is read first (timed as
 * `decode`), the overlapped part is timed as `stream`.
 *
 * With prefilter=auto on a shrinking plan, the render starts on the kernel's own plan while
 * the content-adaptive decision is made in the pool: from the spectrum kept for the source
 * version, or, for a new source, by an analysis that reads the spool file's tiles as their
 * rows are written (src/pool/analysis.ts; it samples the plan's response before the first
 * row), so what is left after the last row is that band's tiles and the decision. Most
 * decisions leave the plan as it is, and the streamed rendition is the answer. One that lowers
 * a cut-off calls the running render off and resamples the spool file with the adapted plan
 * (timed as `resample`): the bytes are those of the decode-then-resample path for the plan
 * decided, either way.
 *
 * Returns null, having decoded nothing, when the render must take the decode-then-resample
 * path: spooling is off, the source has alpha or fewer than STREAM_MIN_PIXELS pixels. Also
 * null when the spool file could not be written or read back (a full or missing folder, no
 * file descriptors left): the caller then decodes in memory. Errors of the source itself are
 * thrown as the in-memory decode throws them.
 */
export async function resampleWhileDecoding(ctx: StreamContext, source: ReadSource, q: RenditionQuery): Promise<StreamedRendition | null> {
  const spool = ctx.pool.spool;
  if (!spool) return null;
  const probe = await ctx.clock.time('decode', () => probeSpooledDecode(source.bytes, decodeLimits(ctx.limits), wishOf(q)));
  if (!probe || probe.width * probe.height < STREAM_MIN_PIXELS) return null;
  const deadline = AbortSignal.timeout(ctx.limits.decodeTimeoutMs + ctx.limits.renderTimeoutMs);
  const stop = ctx.signal ? AbortSignal.any([ctx.signal, deadline]) : deadline;
  // Refuses a bad output size before anything is decoded.
  const first = planRendition(probe, q, ctx.limits);
  const file = spool.path();
  // The file's bytes count in /dev/shm until it is removed (and libvips is done with it).
  const unhold = ctx.pool.holdSpool(probe.width * probe.height * probe.channels * (probe.depth / 8));
  const decodeStart = epochNow();
  const decoding = probe.write(file);
  decoding.then(() => ctx.clock.span('libvips decode to the spool file', 'decode', decodeStart), () => undefined);
  // The kernel's plan renders at once; the content-adaptive decision is asked meanwhile. When
  // it adapts the plan while the source still decodes, that render is called off (its rows stay
  // in the spool file) and the adapted one starts; after, the adapted one follows it. Called off
  // as a failed decode stops a render (its threads stop reading, and live on): aborting a
  // running pool task would end its thread, and a new one takes hundreds of milliseconds to start.
  const speculative = new AbortController();
  const calledOff = new Promise<never>((_, reject) => speculative.signal.addEventListener('abort', () => reject(speculative.signal.reason), { once: true }));
  calledOff.catch(() => undefined);
  let asked: ReturnType<typeof adaptedPlan> = { live: {} };
  let cleanedUp!: (removal: Promise<void>) => void;
  const cleaned = new Promise<void>((resolve) => (cleanedUp = resolve));
  let answered = false;
  const stopAsked = () => asked.live.spool?.stop();
  stop.addEventListener('abort', stopAsked, { once: true });
  try {
    // The render's band tasks go to the pool first (the call queues them at once), then the decision's.
    const streaming = ctx.clock.time('stream', () => ctx.pool.resampleSpooled(file, probe, Promise.race([decoding, calledOff]), first.plan, stop));
    asked = adaptedPlan(ctx, first, probe, file, decoding, q, source.identity, stop);
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
    const done = adapted?.adaptive
      ? { ...adapted, raster: await ctx.clock.time('resample', () => ctx.pool.resampleSpooled(file, probe, decoding, adapted.plan, stop)), deadline, cleaned }
      : { ...first, raster: raster!, deadline, cleaned };
    answered = true;
    return done;
  } catch (e) {
    if (e instanceof SpoolWriteError) return null;
    throw e;
  } finally {
    // The analysis reads the file: it must be done before the file goes (a render that failed
    // calls it off first, rather than let it wait for the rest of the decode).
    stopAsked();
    stop.removeEventListener('abort', stopAsked);
    await asked.deciding?.catch(() => undefined);
    // A rendition is encoded while its file goes (the caller awaits `cleaned`); a failure waits here.
    const removal = spool.remove(file);
    if (answered) cleanedUp(removal.catch(() => undefined));
    else await removal;
    // libvips may make or write the file after this (a deadline settled `decoding` first, or its
    // job was still waiting for a pool thread): once it is done, remove the file again, or it
    // would hold memory in /dev/shm until the pool closes.
    probe.idle().then(() => spool.remove(file)).catch(() => undefined).finally(unhold);
  }
}
