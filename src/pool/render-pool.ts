import type { AdaptiveFilter, PixelRaster, Plan } from '../core/types.js';
import type { SourceSpectrum } from '../core/risk/index.js';
import type { Analysed } from './analysis.js';
import { FoldwiseError } from '../errors.js';
import type { SharedRaster, SpooledRaster } from './worker.js';
import type { Lease, Reservation } from './budget.js';
import type { PoolMemory, RenderPoolOptions } from './options.js';
import { HAND_BACK_MIN_BYTES, handBack } from './hand-back.js';
import { share, StagingBuffers } from './staging.js';
import { SpoolReadError, type SpoolShape } from './spool/rows.js';
import { resampleSpool } from './spool/spooled.js';
import { PoolThreads } from './threads.js';
import { bandRows, outputBuffer, outputRaster, runBandTasks } from './bands.js';
import { PoolAdmission } from './admission.js';
import { note } from './trace-scope.js';
import { type RestHandOver, whileDeciding } from './rest-band.js';

export { type PoolMemory, queuePerThread, type RenderPoolOptions, runningPerThread } from './options.js';

/** A finished spool file rendered while prefilter=auto decides (RenderPool.resampleSpooled). */
export interface WhileDeciding {
  /** Resolves true when the decision adapts the plan (the band is called off), false when it keeps it. */
  callOff: Promise<boolean>;
}

// Idle source buffers kept for reuse are at most this big each (a 16 MP RGBA source); larger
// sources get a fresh buffer (staging.ts), handed back to the system when their job ends.
const STAGING_MAX_BYTES = HAND_BACK_MIN_BYTES;

/**
 * The CPU side of rendering: a piscina pool of worker threads running the core (threads.ts:
 * their life, named tasks and refusals), behind admission by memory (admission.ts): a job
 * runs once its estimated peak bytes fit the budget, `maxQueue` more wait at most
 * `maxWaitMs`, and past that `admit` throws ERR_OVERLOADED (503 with Retry-After) instead of
 * letting work and memory pile up.
 */
export class RenderPool extends PoolThreads {
  private readonly admission: PoolAdmission;
  private readonly staging: StagingBuffers;

  constructor(opts: RenderPoolOptions) {
    super(opts);
    this.staging = new StagingBuffers(this.threads, STAGING_MAX_BYTES);
    this.admission = new PoolAdmission(this.threads, opts);
  }

  /** Most jobs in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.admission.bound;
  }

  /** Jobs admitted and not yet released, running or waiting. */
  get inFlight(): number {
    return this.admission.inFlight;
  }

  /** Jobs waiting for memory plus band tasks waiting for a worker thread. */
  get queueDepth(): number {
    return this.admission.waiting + this.piscina.queueSize;
  }

  /** Admitted bytes against the budget, waiting jobs, spool and idle staging bytes. */
  memory(): PoolMemory {
    return this.admission.memory(this.staging.idleBytes);
  }

  /** Counts a spool file of `bytes` until the returned function is called (its file removed). */
  holdSpool(bytes: number): () => void {
    return this.admission.holdSpool(bytes);
  }

  /**
   * A place in the wait line for a job about to read its source (MemoryBudget.enter), to pass to
   * `admit`. While every place is taken the request waits for one, still unread (`lobby` of them
   * at most, each at most `maxWaitMs`): a burst a little over the line is served a moment later
   * rather than refused. Past a full lobby it rejects with what `admit` would (ERR_OVERLOADED),
   * so a refused request costs no origin read (load/miss-mix.ts at 16 connections: each refused
   * request read a 12 MP source, 3-5 MB, first); ERR_SERVICE_STOPPING once closing; the
   * signal's reason when it aborts while waiting.
   */
  enter(signal?: AbortSignal): Promise<Reservation> {
    if (this.closing) return Promise.reject(this.stopping());
    return this.admission.enter(signal);
  }

  /**
   * Waits for `bytes` of the memory budget (cost.ts estimates them; `heldBytes` of them in
   * garbage-collected buffers, by default all); release the lease when
   * the job's last byte is gone (after its encode). Throws ERR_SOURCE_TOO_COSTLY (413) for a
   * job larger than the budget, ERR_OVERLOADED past the line or the wait, the signal's reason
   * when it aborts while waiting, ERR_SERVICE_STOPPING once the pool is closing. `place`: the
   * job's reservation (`enter`), which ends once memory is asked for; the caller releases it
   * in any case (a no-op then), since a refusal before that leaves it held.
   */
  admit(bytes: number, what: string, signal?: AbortSignal, heldBytes = bytes, place?: Reservation): Promise<Lease> {
    if (this.closing) return Promise.reject(this.stopping());
    return this.admission.admit(bytes, what, signal, heldBytes, place);
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
   * Resamples a source a decoder is still writing to a spool file (spool/spooled.ts), or, with
   * `finished`, one written before (a kept decode: its bands start at once, as in memory).
   * `finished` as WhileDeciding: a file written before, rendered while prefilter=auto decides
   * (one band at once; its rest handed to a free thread once the decision keeps the plan, the
   * band stopped, its output incomplete, once the decision calls it off: rest-band.ts).
   */
  async resampleSpooled(path: string, shape: SpoolShape & { channels: 1 | 3 }, written: Promise<void>, plan: Plan, signal?: AbortSignal, finished: boolean | WhileDeciding = false): Promise<PixelRaster> {
    if (this.closing) throw this.stopping();
    const idle = () => this.whenIdle();
    // With a second thread, a band that lags behind the decode hands over its rest once the decode ends (rest-band.ts).
    const rest: RestHandOver | undefined = typeof finished === 'object'
      ? whileDeciding(finished.callOff, idle)
      : this.threads > 1 && !finished ? { decoded: written, idle } : undefined;
    return resampleSpool(path, shape, written, (src) => this.runBands(src, plan, signal, rest), signal);
  }

  /**
   * The Welch spectrum of a source in shared memory or a spool file (whose decode has ended:
   * the task reads the rows the analysis needs), and prefilter=auto's filter for `plan`.
   */
  async analyse(src: SharedRaster | SpooledRaster, plan: Plan | undefined, signal?: AbortSignal): Promise<Analysed> {
    const analysed = await this.task<Analysed>('analyse', { src, plan }, signal);
    if (analysed.marks) note(...analysed.marks);
    return analysed;
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

  /** Runs the plan's bands of output rows over a shared source (bands.ts); the output raster. */
  private async runBands(shared: SharedRaster | SpooledRaster, plan: Plan, signal?: AbortSignal, rest?: RestHandOver): Promise<PixelRaster> {
    const out = outputBuffer(shared, plan);
    // A band beside the decision (rest.callOff) is one band, whatever its size: its rest waits for the decision.
    const bands = rest?.callOff ? [[0, plan.targetHeight] as [number, number]] : bandRows(this.threads, shared, plan, rest !== undefined);
    try {
      await runBandTasks(this.runBand, shared, plan, out, bands, signal, rest);
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
    return outputRaster(out, shared, plan);
  }
}
