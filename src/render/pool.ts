import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { PixelRaster, Plan } from '../core/types.js';
import { type ErrorCode, FoldwiseError } from '../errors.js';
import type { ResampleTask, SharedRaster } from '../worker.js';
import { Admission } from './admission.js';
import { StagingBuffers } from './staging.js';
import { SpoolWriteError } from '../media/spool-decode.js';
import { feedFromSpool, type FeedShape } from './feed.js';
import { SpoolDir } from './spool.js';

export interface RenderPoolOptions {
  /** Worker threads; 0 = one per available core. */
  threads: number;
  /** Renders allowed to wait beyond one per thread; null = `queuePerThread` per thread. */
  maxQueue: number | null;
  retryAfterSeconds: number;
  /** Spool folder for decodes resampled as they arrive ('auto', a path, or 'off'); default 'off'. */
  spoolDir?: string;
}

/**
 * The default wait line, per worker thread. Waiting renders hold no pixels (the render service
 * drops a source when its permit is released), so memory is bounded by the threads rather
 * than by this line; a short line turns overload into a prompt 503 with Retry-After instead of
 * long waits and client timeouts. Check a setting with load/miss-mix.ts (peak RSS).
 */
export const queuePerThread = 2;

/** Running from TypeScript sources (tsx, vitest): workers need tsx's loader too. */
const fromSource = import.meta.url.endsWith('.ts');
const workerFile = fileURLToPath(new URL(fromSource ? '../worker.ts' : '../worker.js', import.meta.url));
// tsx resolved from this package, not from the working directory: the CLI runs from anywhere.
const tsxLoader = fromSource ? pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href : '';

// Below this many output pixels one worker does the whole rendition: a split would cost more
// in hand-off than it saves (common practice; revisit with load/ measurements).
const SPLIT_MIN_PIXELS = 512 * 512;

// Idle source buffers kept for reuse are at most this big each (a 16 MP RGBA source); larger
// sources get a fresh buffer (staging.ts).
const STAGING_MAX_BYTES = 64 * 2 ** 20;

function share(raster: PixelRaster, staging: StagingBuffers): SharedRaster {
  const depth = raster.data instanceof Uint16Array ? 16 : 8;
  const buffer = staging.take(raster.data.byteLength);
  (depth === 16 ? new Uint16Array(buffer) : new Uint8Array(buffer)).set(raster.data);
  return { buffer, width: raster.width, height: raster.height, channels: raster.channels, depth };
}

/**
 * The CPU side of rendering: a piscina pool of worker threads running the core, behind
 * admission control (src/render/admission.ts): one render per thread holds pixels at a time,
 * `maxQueue` more wait, and past that `admit` throws ERR_OVERLOADED (503 with Retry-After)
 * instead of letting work and memory pile up without bound.
 *
 * Every way a task can be cut short has its own answer: the render's deadline gives
 * ERR_RENDER_TIMEOUT and the pool closing (shutdown) ERR_SERVICE_STOPPING, both 503 with
 * Retry-After, since a retry (later, or on another replica) can succeed; only a task that
 * failed by itself (a worker that crashed or threw) is ERR_RENDER_FAILED (500).
 */
export class RenderPool {
  readonly threads: number;
  readonly retryAfterSeconds: number;
  private readonly admission: Admission;
  private readonly piscina: Piscina<ResampleTask, number>;
  private closing?: Promise<void>;
  private readonly staging: StagingBuffers;
  /** Where spooled decodes write (resampleSpooled), or null when spooling is off or unavailable. */
  readonly spool: SpoolDir | null;

  constructor(opts: RenderPoolOptions) {
    this.threads = opts.threads > 0 ? opts.threads : availableParallelism();
    this.retryAfterSeconds = opts.retryAfterSeconds;
    this.staging = new StagingBuffers(this.threads, STAGING_MAX_BYTES);
    this.spool = SpoolDir.open(opts.spoolDir ?? 'off');
    this.admission = new Admission(this.threads, opts.maxQueue ?? queuePerThread * this.threads, opts.retryAfterSeconds);
    this.piscina = new Piscina<ResampleTask, number>({
      filename: workerFile,
      minThreads: this.threads,
      maxThreads: this.threads,
      // At most one render per thread reaches the pool, with two band tasks each.
      maxQueue: Math.max(1, 2 * this.threads),
      execArgv: fromSource ? ['--import', tsxLoader] : [],
    });
  }

  /** Most renders in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.admission.bound;
  }

  /** Renders admitted and not yet released, running or waiting. */
  get inFlight(): number {
    return this.admission.inFlight;
  }

  /** Renders waiting for a slot plus band tasks waiting for a worker thread. */
  get queueDepth(): number {
    return this.admission.waiting + this.piscina.queueSize;
  }

  get utilization(): number {
    return this.piscina.utilization;
  }

  /** A 503 refusal with Retry-After: the deadline passed, or the pool is closing. */
  refusal(code: Extract<ErrorCode, 'ERR_RENDER_TIMEOUT' | 'ERR_SERVICE_STOPPING'>, detail: string, cause?: unknown): FoldwiseError {
    return new FoldwiseError(code, detail, { cause, headers: { 'retry-after': String(this.retryAfterSeconds) } });
  }

  /**
   * Waits for a render slot; call the returned function when done. Throws ERR_OVERLOADED past
   * the bound, ERR_SERVICE_STOPPING once the pool is closing.
   */
  admit(): Promise<() => void> {
    if (this.closing) return Promise.reject(this.stopping());
    return this.admission.admit();
  }

  /** Resamples `src` by `plan` in the pool; big outputs are split into two bands of rows. */
  async resample(src: PixelRaster, plan: Plan, signal?: AbortSignal): Promise<PixelRaster> {
    // A closed piscina would start fresh threads for a late task: refuse it here instead.
    if (this.closing) throw this.stopping();
    const shared = share(src, this.staging);
    const out = await this.runBands(shared, plan, signal);
    // Only after a clean finish: a task cut short may still be reading the buffer.
    this.staging.give(shared.buffer);
    return out;
  }

  /**
   * Resamples a source that a decoder is still writing to the spool file at `path`
   * (src/media/spool-decode.ts, whose `written` is passed here): the rows are
   * read into shared memory as they appear (feed.ts) and the workers start on the top of the
   * image while the rest is decoded, so most of the resampling overlaps the decode. The
   * decode's own error (ERR_SOURCE_CORRUPT, ...) wins over the render's.
   */
  async resampleSpooled(path: string, shape: FeedShape & { channels: 1 | 3 }, written: Promise<void>, plan: Plan, signal?: AbortSignal): Promise<PixelRaster> {
    if (this.closing) throw this.stopping();
    const buffer = this.staging.take(shape.width * shape.height * shape.channels * (shape.depth / 8));
    const feed = feedFromSpool(path, shape, buffer, written);
    let decodeFailure: unknown;
    written.catch((e: unknown) => (decodeFailure = e ?? new Error('the decode failed')));
    // The feed's own failure (the file could not be opened or read), not one it was told of.
    let stopped = false;
    let readFailure: unknown;
    feed.done.catch((e: unknown) => (readFailure = stopped ? undefined : e));
    const stop = () => {
      stopped = true;
      feed.stop();
    };
    const { width, height, channels, depth } = shape;
    const shared: SharedRaster = { buffer, width, height, channels, depth };
    signal?.addEventListener('abort', stop, { once: true });
    const bands = this.runBands(shared, plan, signal, feed.progress);
    try {
      // The decode must end cleanly too: one that fails after writing its last row (a broken
      // trailer, a write error) is not rendered and cached.
      const [out] = await Promise.all([bands, feed.done, written]);
      this.staging.give(buffer);
      return out;
    } catch (e) {
      stop();
      // The band tasks give up at once on a stopped feed (worker.ts), but one still queued
      // behind busy workers would outlive this render and its admission permit in piscina's
      // bounded queue: wait for them.
      await bands.catch(() => undefined);
      // A failed decode fails the feed and then the workers: report the decode's error.
      if (decodeFailure !== undefined) throw decodeFailure;
      const refused = e instanceof FoldwiseError && e.code !== 'ERR_RENDER_FAILED';
      // A spool file that cannot be read says nothing of the source: the caller decodes in memory.
      if (readFailure !== undefined && !refused) throw new SpoolWriteError(`the spool file ${path} could not be read`, { cause: readFailure });
      throw e instanceof FoldwiseError ? e : new FoldwiseError('ERR_RENDER_FAILED', 'resampling failed', { cause: e });
    } finally {
      signal?.removeEventListener('abort', stop);
    }
  }

  /** Runs the plan's bands of output rows over a shared source; the output raster. */
  private async runBands(shared: SharedRaster, plan: Plan, signal?: AbortSignal, progress?: SharedArrayBuffer): Promise<PixelRaster> {
    const out = new SharedArrayBuffer(plan.targetWidth * plan.targetHeight * shared.channels * (shared.depth / 8));
    const h = plan.targetHeight;
    const split = this.threads > 1 && plan.targetWidth * h >= SPLIT_MIN_PIXELS;
    const bands: [number, number][] = split ? [[0, h >> 1], [h >> 1, h]] : [[0, h]];
    try {
      // Every band settles before the render does, failed or not: a band still queued or running
      // would otherwise outlive the render's admission permit in piscina's bounded queue.
      const settled = await Promise.allSettled(bands.map((rows) => this.piscina.run({ src: shared, plan, rows, out, progress }, { signal })));
      const failed = settled.find((r) => r.status === 'rejected');
      if (failed) throw failed.reason;
    } catch (e) {
      // piscina rejects with its AbortError for our deadline, and with its own abort or
      // "Terminating worker thread" when it is closed under a task: neither is a failed render.
      if (signal?.aborted) throw this.refusal('ERR_RENDER_TIMEOUT', 'resampling took longer than allowed', e);
      if (this.closing) throw this.stopping(e);
      throw new FoldwiseError('ERR_RENDER_FAILED', 'resampling failed', { cause: e });
    }
    const data = shared.depth === 16 ? new Uint16Array(out) : new Uint8Array(out);
    return { data, width: plan.targetWidth, height: plan.targetHeight, channels: shared.channels };
  }

  /** Refuses new renders at once, lets running tasks finish (piscina's close), then ends the threads. */
  close(): Promise<void> {
    this.closing ??= this.piscina.close().finally(() => this.spool?.close());
    return this.closing;
  }

  private stopping(cause?: unknown): FoldwiseError {
    return this.refusal('ERR_SERVICE_STOPPING', 'the render pool is shutting down', cause);
  }
}
