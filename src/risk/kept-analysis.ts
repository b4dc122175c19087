import type { SourceSpectrum } from '../core/risk/index.js';
import type { DecodeWish } from '../codec/decode.js';
import { probeSpooledDecode, SpoolWriteError } from '../codec/spool-decode.js';
import { liveSpool } from '../pool/spool/live.js';
import type { RenderContext } from '../rendition/service.js';
import { decodeLimits, type ReadSource } from '../rendition/source.js';
import { STREAM_MIN_PIXELS } from '../rendition/streamed.js';
import { decodeOf, startSpoolDecode } from '../rendition/spool-job.js';
import type { StageClock } from '../rendition/timings.js';

/** What the report analyses: the source's own gamut, the first frame (as a rendition's default decode of a still). */
const reportWish: DecodeWish = { gamut: 'source', frames: 0 };

/**
 * A new source's analysis for the alias-risk report, through a spool file that is then kept
 * (`cache.decodedBytes`, src/pool/spool/kept.ts): the renditions that often follow a report
 * (a CMS that asks the risk before it publishes, the inspector) resample that decode instead
 * of decoding the source again (one asked while the report decodes waits for its file). The pool's thread reads the file's Welch tiles as the render
 * path's analysis does, so the spectrum is the same. Undefined, having decoded nothing, when
 * no decode can be kept (spooling off, `cache.decodedBytes` 0, over half of it) or the render path would not
 * spool this source (alpha, a wide gamut kept, animated, under 1 MP), and when the spool file
 * cannot be written: the caller then decodes in memory as before. A source's own errors are
 * thrown as the in-memory decode throws them. `made` is told the spectrum first. `analyseMs`: the analysis alone (the decode is timed on `clock`).
 */
export async function analyseIntoKept(render: RenderContext, read: ReadSource, clock: StageClock, made: (s: SourceSpectrum) => void): Promise<{ spectrum: SourceSpectrum; analyseMs: number } | undefined> {
  const { pool, keptDecodes: kept } = render;
  const spool = pool.spool;
  if (!spool || !kept) return undefined;
  const probe = await clock.time('decode', () => probeSpooledDecode(read.bytes, decodeLimits(render.limits), reportWish));
  if (!probe || probe.width * probe.height < STREAM_MIN_PIXELS) return undefined;
  if (!kept.takes(probe.width * probe.height * probe.channels * (probe.depth / 8))) return undefined;
  const job = startSpoolDecode(pool, spool, kept, probe, decodeOf(read, reportWish));
  let done = false;
  try {
    await clock.time('decode', () => job.decoding);
    const start = performance.now();
    const { spectrum } = await pool.analyse(liveSpool(job.file, job.shape, Promise.resolve()).raster, undefined);
    const analyseMs = performance.now() - start;
    // Known before the file is kept and its waiters woken: they decide from it, not analyse again.
    made(spectrum);
    done = true;
    return { spectrum, analyseMs };
  } catch (e) {
    if (!(e instanceof SpoolWriteError)) throw e;
    // The folder may be full: its space goes to the decodes in progress.
    kept.clear();
    return undefined;
  } finally {
    await job.end(done).removed;
  }
}
