import { existsSync } from 'node:fs';
import type { PixelRaster } from '../core/types.js';
import { probeSpooledDecode, SpoolWriteError } from '../codec/spool-decode.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { type PlannedRendition, planRendition } from './plan.js';
import type { DecodeOf } from '../pool/spool/kept.js';
import { renderSpoolFile, type StreamContext } from './spool-render.js';
import { decodeLimits, type ReadSource, wishOf } from './source.js';
import { epochNow } from '../pool/trace.js';
import { decodeOf, startSpoolDecode } from './spool-job.js';
import { withDeadline } from '../lib/deadline.js';

export type { StreamContext } from './spool-render.js';

/**
 * Sources smaller than this decode in a few milliseconds, less than the spool file and the
 * row polling cost: they take the in-memory path (`npm run bench`: a 0.12 MP upscale took
 * ~2.5 ms longer streamed, a 4 MP source ~0.3x of its decode time less).
 */
export const STREAM_MIN_PIXELS = 1 << 20;

/** A rendition resampled while its source decoded (or from its kept decode). */
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

/** The deadline of a streamed render (decode, resample and encode), and the render's stop signal. */
function deadlines(ctx: StreamContext): { deadline: AbortSignal; stop: AbortSignal } {
  const deadline = AbortSignal.timeout(ctx.limits.decodeTimeoutMs + ctx.limits.renderTimeoutMs);
  return { deadline, stop: ctx.signal ? AbortSignal.any([ctx.signal, deadline]) : deadline };
}

/**
 * Renders `q` from the decode of `source` kept since an earlier rendition, with no decode at
 * all (timed as `resample`); null when none is kept, or its file could not be read back (then it is let go).
 */
async function resampleKept(ctx: StreamContext, source: ReadSource, q: RenditionQuery, of: DecodeOf): Promise<StreamedRendition | null> {
  const lent = ctx.keptDecodes?.lend(of);
  if (!lent) return null;
  try {
    const { deadline, stop } = deadlines(ctx);
    const first = planRendition(lent.shape, q, ctx.limits);
    const done = await renderSpoolFile(ctx, { file: lent.path, shape: lent.shape, decoding: Promise.resolve(), finished: true }, first, q, source.identity, stop);
    return { ...done, deadline, cleaned: Promise.resolve() };
  } catch (e) {
    // A file that cannot be read back (or is gone, which an analysis of it reports its own way).
    if (!(e instanceof SpoolWriteError) && existsSync(lent.path)) throw e;
    ctx.keptDecodes?.forget(of.key, lent.path);
    return null;
  } finally {
    lent.release();
  }
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
 * decided, either way (spool-render.ts).
 *
 * A finished decode's file is kept for the next rendition of the same source version when the
 * context keeps decodes (`cache.decodedBytes`), and that rendition reads it with no decode.
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
  const of = decodeOf(source, wishOf(q));
  const fromKept = await resampleKept(ctx, source, q, of);
  if (fromKept) return fromKept;
  const probe = await ctx.clock.time('decode', () => probeSpooledDecode(source.bytes, decodeLimits(ctx.limits), wishOf(q)));
  if (!probe || probe.width * probe.height < STREAM_MIN_PIXELS) return null;
  // Another rendition of this source is decoding it now, into a file to be kept: this one waits
  // for that file rather than decode the source a second time beside it on the same cores.
  // (Asked after the header read and noted below with no wait in between, so of renditions
  // arriving together exactly one decodes.)
  const other = ctx.keptDecodes?.decoding(of);
  if (other) {
    await (ctx.signal ? withDeadline(other, ctx.signal, () => ctx.signal!.reason as Error) : other);
    const afterIt = await resampleKept(ctx, source, q, of);
    if (afterIt) return afterIt;
  }
  const { deadline, stop } = deadlines(ctx);
  // Refuses a bad output size before anything is decoded.
  const first = planRendition(probe, q, ctx.limits);
  const decodeStart = epochNow();
  const job = startSpoolDecode(ctx.pool, spool, ctx.keptDecodes, probe, of);
  job.decoding.then(() => ctx.clock.span('libvips decode to the spool file', 'decode', decodeStart), () => undefined);
  let cleanedUp!: (removal: Promise<void>) => void;
  const cleaned = new Promise<void>((resolve) => (cleanedUp = resolve));
  let answered = false;
  try {
    const done = await renderSpoolFile(ctx, { file: job.file, shape: job.shape, decoding: job.decoding, finished: false }, first, q, source.identity, stop);
    answered = true;
    return { ...done, deadline, cleaned };
  } catch (e) {
    if (!(e instanceof SpoolWriteError)) throw e;
    // The folder may be full: its space goes to the decodes in progress.
    ctx.keptDecodes?.clear();
    return null;
  } finally {
    // An answer's decode ended cleanly (the render awaited it): its whole file is kept for the next
    // rendition, or removed while the rendition is encoded (the caller awaits `cleaned`); a failure waits here.
    const { removed } = job.end(answered);
    if (answered) cleanedUp(removed.catch(() => undefined));
    else await removed;
  }
}
