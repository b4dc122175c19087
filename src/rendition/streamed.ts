import type { Limits } from '../config.js';
import type { PixelRaster, Plan } from '../core/types.js';
import { probeSpooledDecode, SpoolWriteError } from '../codec/spool-decode.js';
import type { SourceIdentity } from '../origins/types.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { type PlannedRendition, planRendition } from './plan.js';
import type { RenderPool } from '../pool/render-pool.js';
import { type SpoolShape, WRITTEN } from '../pool/spool/rows.js';
import type { SpooledRaster } from '../pool/worker.js';
import { type AdaptivePrefilter, shrinks } from './prefilter.js';
import { decodeLimits, type ReadSource, wishOf } from './source.js';
import type { StageClock } from './timings.js';

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
}

/**
 * The plan for a streamed render, and whether it is provisional: with prefilter=auto on a
 * shrinking plan and no spectrum kept for the source version, the render starts on the plan
 * without the content-adaptive filter while the analysis waits for the decode to end.
 */
async function streamPlan(ctx: StreamContext, first: PlannedRendition, size: { width: number; height: number }, q: RenditionQuery, identity: SourceIdentity, signal: AbortSignal): Promise<{ planned: PlannedRendition; provisional: boolean }> {
  const { adaptive } = ctx;
  if (q.prefilter !== 'auto' || !adaptive || !shrinks(first.plan)) return { planned: first, provisional: false };
  const decide = async (plan: Plan) => {
    const known = await adaptive.known(plan, identity, signal);
    return known ? known.filter : null;
  };
  const planned = await planRendition(size, q, ctx.limits, { decide });
  return planned ? { planned, provisional: false } : { planned: first, provisional: true };
}

/** The spool file as a source whose decode has ended (the analysis reads it after the decode). */
function written(path: string, probe: SpoolShape & { channels: 1 | 3 }): SpooledRaster {
  const state = new Int32Array(new SharedArrayBuffer(4));
  state[0] = WRITTEN;
  const { width, height, channels, depth } = probe;
  return { path, width, height, channels, depth, state: state.buffer as SharedArrayBuffer };
}

/**
 * Renders `q` from `source` with the decode and the resample overlapped: libvips writes the
 * decoded rows to a spool file (src/codec/spool-decode.ts) and the pool's workers resample
 * them as they arrive (RenderPool.resampleSpooled), so the rendition is ready soon after the
 * last row is decoded instead of a whole resample later. The header is read first (timed as
 * `decode`), the overlapped part is timed as `stream`.
 *
 * The first rendition of a new source (prefilter=auto, no spectrum kept) streams too: it
 * renders on the plan without the content-adaptive filter while the source decodes, and once
 * the last row is written the pool analyses the spool file's rows (in parallel with the
 * render's last rows). When the analysis leaves the plan as it is (most pictures) the streamed
 * rendition is the answer; when it lowers a cut-off, the source is resampled again from the
 * spool file with the adapted plan (timed as `resample`): the bytes are those of the
 * decode-then-resample path for that plan either way.
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
  // The decode starts before the plan is settled: deciding from a kept spectrum is a pool task,
  // and the rows spooled meanwhile are resampled at once when it ends.
  const decoding = probe.write(file);
  decoding.catch(() => undefined);
  let analysing: Promise<PlannedRendition | null> | undefined;
  try {
    const { planned, provisional } = await streamPlan(ctx, first, probe, q, source.identity, stop);
    // Once the last row is written, the new source's analysis, while the render finishes.
    const { adaptive } = ctx;
    if (provisional && adaptive) {
      const decide = (plan: Plan) => adaptive.analyse(written(file, probe), plan, source.identity, stop);
      analysing = decoding.then(() => planRendition(probe, q, ctx.limits, { decide }));
    }
    analysing?.catch(() => undefined);
    const raster = await ctx.clock.time('stream', () => ctx.pool.resampleSpooled(file, probe, decoding, planned.plan, stop));
    // What the analysis adds after the render (timed as `plan`; absent when none ran).
    const adapted = analysing && (await ctx.clock.time('plan', () => analysing));
    if (!adapted?.adaptive) return { ...planned, raster, deadline };
    const again = await ctx.clock.time('resample', () => ctx.pool.resampleSpooled(file, probe, decoding, adapted.plan, stop));
    return { ...adapted, raster: again, deadline };
  } catch (e) {
    if (e instanceof SpoolWriteError) return null;
    throw e;
  } finally {
    // The analysis reads the file: it must be done before the file goes.
    await analysing?.catch(() => undefined);
    await spool.remove(file);
    // libvips may make or write the file after this (a deadline settled `decoding` first, or its
    // job was still waiting for a pool thread): once it is done, remove the file again, or it
    // would hold memory in /dev/shm until the pool closes.
    probe.idle().then(() => spool.remove(file)).catch(() => undefined).finally(unhold);
  }
}
