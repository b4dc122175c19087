import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { AdaptiveFilter, PixelRaster, Plan } from '../core/types.js';
import type { SourceSpectrum } from '../core/risk/index.js';
import type { Analysed } from './analysis.js';
import { type ErrorCode, FoldwiseError } from '../errors.js';
import type { BandOutcome, ResampleTask, SharedRaster, SpooledRaster } from './worker.js';
import { type Lease, MemoryBudget } from './budget.js';
import { type PoolMemory, queuePerThread, type RenderPoolOptions, runningPerThread } from './options.js';
import { ownSignal } from './tasks.js';
import { warmThreads } from './warm-start.js';
import { resolveMemoryBudget } from './budget-default.js';
import { HAND_BACK_MIN_BYTES, handBack } from './hand-back.js';
import { share, StagingBuffers } from './staging.js';
import { SpoolWriteError } from '../codec/spool-decode.js';
import { SpoolReadError, type SpoolShape, STOPPED, WRITING, WRITTEN } from './spool/rows.js';
import { SpoolDir } from './spool/dir.js';
import { type BandPiscina, piscinaRunner, type RunBand } from './runner.js';

export { type PoolMemory, queuePerThread, type RenderPoolOptions, runningPerThread } from './options.js';

/** Running from TypeScript sources (tsx, vitest): workers need tsx's loader too. */
const fromSource = import.meta.url.endsWith('.ts');
const workerFile = fileURLToPath(new URL(fromSource ? './worker.ts' : './worker.js', import.meta.url));
// tsx resolved from this package, not from the working directory: the CLI runs from anywhere.
const tsxLoader = fromSource ? pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href : '';

// Below this many output pixels one worker does the whole rendition: a split would cost more
// in hand-off than it saves (common practice; revisit with load/ measurements).
const SPLIT_MIN_PIXELS = 512 * 512;

// A spooled render splits its output only when it shrinks the source's area by less than this:
// 12 MP -> 800 px keeps pace with the decode in one worker, and measured no slower than with
// two bands (1.30-1.37x against 1.37-1.55x sharp's decode-only time, three runs each), since a
// second busy worker slows the decode it overlaps.
const STREAM_SPLIT_SHRINK = 4;

// Idle source buffers kept for reuse are at most this big each (a 16 MP RGBA source); larger
// sources get a fresh buffer (staging.ts), handed back to the system when their job ends.
const STAGING_MAX_BYTES = HAND_BACK_MIN_BYTES;

/**
 * The CPU side of rendering: a piscina pool of worker threads running the core, behind
 * admission by memory (src/pool/budget.ts): a job runs once its estimated peak bytes fit
 * the budget, `maxQueue` more wait at most `maxWaitMs`, and past that `admit` throws
 * ERR_OVERLOADED (503 with Retry-After) instead of letting work and memory pile up.
 *
 * Every way a task can be cut short has its own answer: the render's deadline gives
 * ERR_RENDER_TIMEOUT and the pool closing (shutdown) ERR_SERVICE_STOPPING, both 503 with
 * Retry-After, since a retry (later, or on another replica) can succeed; only a task that
 * failed by itself (a worker that crashed or threw) is ERR_RENDER_FAILED (500).
 */
export class RenderPool {
  readonly threads: number;
  readonly retryAfterSeconds: number;
  private readonly budget: MemoryBudget;
  private spooled = 0;
  private readonly rssCeiling: number;
  private readonly piscina: BandPiscina;
  private readonly runBand: RunBand;
  private warming?: Promise<void>;
  private isWarm = false;
  private closing?: Promise<void>;
  private readonly staging: StagingBuffers;
  /** Where spooled decodes write (resampleSpooled), or null when spooling is off or unavailable. */
  readonly spool: SpoolDir | null;

  constructor(opts: RenderPoolOptions) {
    this.threads = opts.threads > 0 ? opts.threads : availableParallelism();
    this.retryAfterSeconds = opts.retryAfterSeconds;
    this.rssCeiling = opts.rssCeilingBytes ?? 0;
    this.staging = new StagingBuffers(this.threads, STAGING_MAX_BYTES);
    this.spool = SpoolDir.open(opts.spoolDir ?? 'off');
    const maxRunning = runningPerThread * this.threads;
    this.budget = new MemoryBudget({
      budgetBytes: resolveMemoryBudget(opts.memoryBudgetBytes ?? null),
      maxRunning,
      maxWaiting: opts.maxQueue ?? queuePerThread * this.threads,
      maxWaitMs: opts.maxWaitMs ?? 4000,
      retryAfterSeconds: opts.retryAfterSeconds,
    });
    this.piscina = new Piscina<ResampleTask, BandOutcome>({
      filename: workerFile,
      minThreads: this.threads,
      maxThreads: this.threads,
      // At most `maxRunning` jobs reach the pool, with at most three tasks each at once: two
      // bands, or a band and the new source's analysis, or the decision and then the bands.
      maxQueue: 3 * maxRunning,
      // piscina's default has an idle thread block in Atomics.wait, still holding its last
      // task: the collection a large source's task schedules (worker.ts) never ran, and one
      // mapping the size of that source stayed for good. Message events let it run.
      atomics: 'disabled',
      execArgv: fromSource ? ['--import', tsxLoader] : [],
    });
    this.runBand = (opts.runner ?? piscinaRunner)(this.piscina);
  }

  /** Most jobs in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.budget.bound;
  }

  /** Jobs admitted and not yet released, running or waiting. */
  get inFlight(): number {
    const { running, waiting } = this.budget.state;
    return running + waiting;
  }

  /** Jobs waiting for memory plus band tasks waiting for a worker thread. */
  get queueDepth(): number {
    return this.budget.state.waiting + this.piscina.queueSize;
  }

  /** Admitted bytes against the budget, waiting jobs, spool and idle staging bytes. */
  memory(): PoolMemory {
    return { ...this.budget.state, spoolBytes: this.spooled, stagingIdleBytes: this.staging.idleBytes };
  }

  /** Counts a spool file of `bytes` until the returned function is called (its file removed). */
  holdSpool(bytes: number): () => void {
    this.spooled += bytes;
    let held = true;
    return () => {
      if (held) this.spooled -= bytes;
      held = false;
    };
  }

  get utilization(): number {
    return this.piscina.utilization;
  }

  /** A 503 refusal with Retry-After: the deadline passed, or the pool is closing. */
  refusal(code: Extract<ErrorCode, 'ERR_RENDER_TIMEOUT' | 'ERR_SERVICE_STOPPING'>, detail: string, cause?: unknown): FoldwiseError {
    return new FoldwiseError(code, detail, { cause, headers: { 'retry-after': String(this.retryAfterSeconds) } });
  }

  /**
   * Waits for `bytes` of the memory budget (cost.ts estimates them; `heldBytes` of them in
   * garbage-collected buffers, by default all); release the lease when
   * the job's last byte is gone (after its encode). Throws ERR_SOURCE_TOO_COSTLY (413) for a
   * job larger than the budget, ERR_OVERLOADED past the line or the wait, the signal's reason
   * when it aborts while waiting, ERR_SERVICE_STOPPING once the pool is closing.
   */
  admit(bytes: number, what: string, signal?: AbortSignal, heldBytes = bytes): Promise<Lease> {
    if (this.closing) return Promise.reject(this.stopping());
    // RSS only as a last resort, and only while other jobs run: their end brings it down, so
    // this can never refuse for good (an idle replica over the ceiling is /healthz's concern).
    if (this.rssCeiling > 0 && this.budget.state.running > 0 && process.memoryUsage.rss() > this.rssCeiling) {
      const s = this.retryAfterSeconds;
      return Promise.reject(
        new FoldwiseError('ERR_OVERLOADED', `resident memory is over ${this.rssCeiling} bytes while jobs run; retry in ${s} s`, {
          headers: { 'retry-after': String(s) },
        }),
      );
    }
    return this.budget.acquire(bytes, what, signal).then((lease) => {
      if (heldBytes < HAND_BACK_MIN_BYTES) return lease;
      // A job whose buffers in this process (`heldBytes` of `bytes`; an encoder's working set is
      // not) were this big dropped them: collect them now that it has ended (hand-back.ts). A
      // full collection stops the event loop, so only then.
      return { bytes, release: () => (lease.release(), handBack()) };
    });
  }

  /**
   * Resamples `src` by `plan` in the pool; big outputs are split into two bands of rows. The
   * plan may be a function of the source staged in shared memory (the content-adaptive plan
   * asks the pool to analyse it first, src/risk/service.ts), so the pixels are copied once.
   */
  async resample(src: PixelRaster, plan: Plan | ((staged: SharedRaster) => Promise<Plan>), signal?: AbortSignal): Promise<PixelRaster> {
    // A closed piscina would start fresh threads for a late task: refuse it here instead.
    if (this.closing) throw this.stopping();
    const shared = share(src, this.staging);
    const out = await this.runBands(shared, typeof plan === 'function' ? await plan(shared) : plan, signal);
    // Only after a clean finish: a task cut short may still be reading the buffer.
    if (shared.buffer.byteLength <= STAGING_MAX_BYTES) this.staging.give(shared.buffer);
    else handBack();
    return out;
  }

  /**
   * Resamples a source that a decoder is still writing to the spool file at `path`
   * (src/codec/spool-decode.ts, whose `written` is passed here): the workers read the rows
   * from the file as they appear (spool-rows.ts) and start on the top of the image while the
   * rest is decoded, so most of the resampling overlaps the decode, and no copy of the whole
   * source is made. The decode's own error (ERR_SOURCE_CORRUPT, ...) wins over the render's;
   * a spool file that cannot be read back, or is not what was written, gives SpoolWriteError
   * (the caller then decodes in memory).
   */
  async resampleSpooled(path: string, shape: SpoolShape & { channels: 1 | 3 }, written: Promise<void>, plan: Plan, signal?: AbortSignal): Promise<PixelRaster> {
    if (this.closing) throw this.stopping();
    const state = new Int32Array(new SharedArrayBuffer(4));
    const settle = (to: number) => {
      if (Atomics.compareExchange(state, 0, WRITING, to) === WRITING) Atomics.notify(state, 0);
    };
    let decodeFailure: unknown;
    written.then(
      () => settle(WRITTEN),
      (e: unknown) => {
        decodeFailure = e ?? new Error('the decode failed');
        settle(STOPPED);
      },
    );
    const stop = () => {
      Atomics.store(state, 0, STOPPED);
      Atomics.notify(state, 0);
    };
    const { width, height, channels, depth } = shape;
    const src: SpooledRaster = { path, width, height, channels, depth, state: state.buffer as SharedArrayBuffer };
    signal?.addEventListener('abort', stop, { once: true });
    const bands = this.runBands(src, plan, signal);
    try {
      // The decode must end cleanly too: one that fails after writing its last row (a broken
      // trailer, a write error) is not rendered and cached.
      const [out] = await Promise.all([bands, written]);
      return out;
    } catch (e) {
      stop();
      // The band tasks give up at once once stopped, but one still queued behind busy workers
      // would outlive this render and its admission permit in piscina's bounded queue.
      await bands.catch(() => undefined);
      // A failed decode stops the workers: report the decode's error.
      if (decodeFailure !== undefined) throw decodeFailure;
      // A spool file that cannot be read, or is not what was written, says nothing of the source.
      if (e instanceof SpoolReadError) throw new SpoolWriteError(`the spool file ${path} could not be read back`, { cause: e });
      throw e instanceof FoldwiseError ? e : new FoldwiseError('ERR_RENDER_FAILED', 'resampling failed', { cause: e });
    } finally {
      signal?.removeEventListener('abort', stop);
    }
  }

  /**
   * The Welch spectrum of a source in shared memory or a spool file (whose decode has ended:
   * the task reads the rows the analysis needs), and prefilter=auto's filter for `plan`.
   */
  analyse(src: SharedRaster | SpooledRaster, plan: Plan | undefined, signal?: AbortSignal): Promise<Analysed> {
    return this.task('analyse', { src, plan }, signal);
  }

  /** The Welch spectrum of a decoded raster, analysed in the pool (the raster is staged in shared memory). */
  async analyseRaster(src: PixelRaster, signal?: AbortSignal): Promise<SourceSpectrum> {
    if (this.closing) throw this.stopping();
    const shared = share(src, this.staging);
    const { spectrum } = await this.analyse(shared, undefined, signal);
    if (shared.buffer.byteLength <= STAGING_MAX_BYTES) this.staging.give(shared.buffer);
    return spectrum;
  }

  /** prefilter=auto's filter for `plan` from a spectrum analysed before. */
  adapt(spectrum: SourceSpectrum, plan: Plan, signal?: AbortSignal): Promise<AdaptiveFilter | undefined> {
    return this.task('adapt', { spectrum, plan }, signal);
  }

  /**
   * Resolves once every thread has started, compiled its SIMD kernels and rendered, analysed
   * and decided once (warm.ts), and this thread has run sharp's codecs once (codec/warm.ts):
   * what /readyz waits for. Rejects only when the pool closes first.
   */
  warm(): Promise<void> {
    this.warming ??= warmThreads(this.threads, (task) => this.task('warm', task), this.spool).then(() => {
      this.isWarm = true;
    });
    return this.warming;
  }

  /** Whether warm() has resolved. */
  get warmed(): boolean {
    return this.isWarm;
  }

  /** Runs a named task of worker.ts, with the same refusals as a render's bands. */
  private async task<T>(name: string, task: object, signal?: AbortSignal): Promise<T> {
    if (this.closing) throw this.stopping();
    const own = ownSignal(signal);
    try {
      // Named tasks answer their own types, not a band's outcome.
      return (await this.piscina.run(task as ResampleTask, { name, signal: own.signal })) as unknown as T;
    } catch (e) {
      if (signal?.aborted && signal.reason instanceof FoldwiseError) throw signal.reason;
      if (signal?.aborted) throw this.refusal('ERR_RENDER_TIMEOUT', `the ${name} task took longer than allowed`, e);
      if (this.closing) throw this.stopping(e);
      throw new FoldwiseError('ERR_RENDER_FAILED', `the ${name} task failed`, { cause: e });
    } finally {
      own.unlink();
    }
  }

  /** Runs the plan's bands of output rows over a shared source; the output raster. */
  private async runBands(shared: SharedRaster | SpooledRaster, plan: Plan, signal?: AbortSignal): Promise<PixelRaster> {
    const out = new SharedArrayBuffer(plan.targetWidth * plan.targetHeight * shared.channels * (shared.depth / 8));
    const h = plan.targetHeight;
    const pixels = plan.targetWidth * h;
    // A source still arriving paces the resample: one worker keeps up with the decode unless
    // the output is large (little shrinking, no pyramid), and the other stays free for the
    // next render instead of waiting on rows.
    const paced = 'path' in shared && pixels * STREAM_SPLIT_SHRINK <= shared.width * shared.height;
    const split = this.threads > 1 && pixels >= SPLIT_MIN_PIXELS && !paced;
    const bands: [number, number][] = split ? [[0, h >> 1], [h >> 1, h]] : [[0, h]];
    try {
      // Every band settles before the render does, failed or not: a band still queued or running
      // would otherwise outlive the render's admission permit in piscina's bounded queue.
      // A signal of this call's own (tasks.ts), unlinked when the bands end.
      const own = ownSignal(signal);
      const runs = bands.map((rows) => this.runBand({ src: shared, plan, rows, out }, { signal: own.signal }));
      const settled = await Promise.allSettled(runs).finally(own.unlink);
      const failed = settled.find((r) => r.status === 'rejected');
      if (failed) throw failed.reason;
      for (const r of settled as PromiseFulfilledResult<BandOutcome>[]) {
        if (r.value.kind === 'spool') throw new SpoolReadError(r.value.fault, r.value.detail);
      }
    } catch (e) {
      // piscina rejects with its AbortError for our deadline, and with its own abort or
      // "Terminating worker thread" when it is closed under a task: neither is a failed render.
      // A caller that went away aborts with its own reason (ERR_REQUEST_ABANDONED).
      if (signal?.aborted && signal.reason instanceof FoldwiseError) throw signal.reason;
      if (signal?.aborted) throw this.refusal('ERR_RENDER_TIMEOUT', 'resampling took longer than allowed', e);
      if (this.closing) throw this.stopping(e);
      // The spool file's own faults go to resampleSpooled as they are (the caller decodes in memory).
      if (e instanceof SpoolReadError && e.fault !== 'stopped') throw e;
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
