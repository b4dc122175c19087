import type { Limits } from '../config.js';
import type { PixelRaster } from '../core/types.js';
import { probeSpooledDecode, SpoolWriteError } from '../codec/spool-decode.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { type PlannedRendition, planRendition, type SourceSpectra } from './plan.js';
import type { RenderPool } from '../pool/render-pool.js';
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
  spectra?: SourceSpectra;
}

/** A rendition resampled while its source decoded. */
export interface StreamedRendition extends PlannedRendition {
  raster: PixelRaster;
  /** Started before the decode: covers decode, resample and then the encode. */
  deadline: AbortSignal;
}

/**
 * Renders `q` from `source` with the decode and the resample overlapped: libvips writes the
 * decoded rows to a spool file (src/codec/spool-decode.ts) and the pool's workers resample
 * them as they arrive (RenderPool.resampleSpooled), so the rendition is ready soon after the
 * last row is decoded instead of a whole resample later. The header is read first (timed as
 * `decode`), the overlapped part is timed as `stream`.
 *
 * Returns null, having decoded nothing, when the render must take the decode-then-resample
 * path: spooling is off, the source has alpha or fewer than STREAM_MIN_PIXELS pixels, or the
 * plan needs a spectrum not at hand. Also null when the spool file could not be written or
 * read back (a full or missing folder, no file descriptors left): the caller then decodes in
 * memory. Errors of the source itself are thrown as the in-memory decode throws them.
 */
export async function resampleWhileDecoding(ctx: StreamContext, source: ReadSource, q: RenditionQuery): Promise<StreamedRendition | null> {
  const spool = ctx.pool.spool;
  if (!spool) return null;
  const probe = await ctx.clock.time('decode', () => probeSpooledDecode(source.bytes, decodeLimits(ctx.limits), wishOf(q)));
  if (!probe || probe.width * probe.height < STREAM_MIN_PIXELS) return null;
  // With prefilter=auto the adaptive filter needs the source's spectrum already at hand (an
  // earlier rendition of the same version analysed it); else the pixels come first (null).
  const { spectra } = ctx;
  const planned = planRendition(probe, q, ctx.limits, spectra && (() => spectra.known(source.identity)));
  if (!planned) return null;
  const deadline = AbortSignal.timeout(ctx.limits.decodeTimeoutMs + ctx.limits.renderTimeoutMs);
  const stop = ctx.signal ? AbortSignal.any([ctx.signal, deadline]) : deadline;
  const file = spool.path();
  // The file's bytes count in /dev/shm until it is removed (and libvips is done with it).
  const unhold = ctx.pool.holdSpool(probe.width * probe.height * probe.channels * (probe.depth / 8));
  const written = probe.write(file);
  try {
    const raster = await ctx.clock.time('stream', () => ctx.pool.resampleSpooled(file, probe, written, planned.plan, stop));
    return { ...planned, raster, deadline };
  } catch (e) {
    if (e instanceof SpoolWriteError) return null;
    throw e;
  } finally {
    written.catch(() => undefined);
    await spool.remove(file);
    // libvips may make or write the file after this (a deadline settled `written` first, or its
    // job was still waiting for a pool thread): once it is done, remove the file again, or it
    // would hold memory in /dev/shm until the pool closes.
    probe.idle().then(() => spool.remove(file)).catch(() => undefined).finally(unhold);
  }
}
