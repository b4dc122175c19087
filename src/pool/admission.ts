import { type Lease, MemoryBudget, type Reservation } from './budget.js';
import { resolveMemoryBudget } from './budget-default.js';
import { HAND_BACK_MIN_BYTES, handBack } from './hand-back.js';
import { type PoolMemory, queuePerThread, type RenderPoolOptions, runningPerThread } from './options.js';
import { overRss } from './refusals.js';

/**
 * The pool's admission by memory (src/pool/budget.ts): a job runs once its estimated peak
 * bytes fit the budget, `maxQueue` more wait at most `maxWaitMs`, and past that `admit`
 * throws ERR_OVERLOADED (503 with Retry-After) instead of letting work and memory pile up.
 * Also counts the bytes of spool files in progress.
 */
export class PoolAdmission {
  private readonly budget: MemoryBudget;
  private readonly rssCeiling: number;
  private readonly retryAfterSeconds: number;
  private spooled = 0;

  constructor(threads: number, opts: RenderPoolOptions) {
    this.retryAfterSeconds = opts.retryAfterSeconds;
    this.rssCeiling = opts.rssCeilingBytes ?? 0;
    this.budget = new MemoryBudget({
      budgetBytes: resolveMemoryBudget(opts.memoryBudgetBytes ?? null),
      maxRunning: runningPerThread * threads,
      maxWaiting: opts.maxQueue ?? queuePerThread * threads,
      maxWaitMs: opts.maxWaitMs ?? 4000,
      retryAfterSeconds: opts.retryAfterSeconds,
      maxLobby: opts.lobby ?? 0,
    });
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

  /** Jobs waiting for memory. */
  get waiting(): number {
    return this.budget.state.waiting;
  }

  /** Admitted bytes against the budget, waiting jobs, spool and idle staging bytes. */
  memory(stagingIdleBytes: number): PoolMemory {
    return { ...this.budget.state, spoolBytes: this.spooled, stagingIdleBytes };
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

  /** A place in the wait line, taken before the job's source is read, waiting in the lobby while every place is taken (MemoryBudget.enter). */
  enter(signal?: AbortSignal): Promise<Reservation> {
    return this.budget.enter(signal);
  }

  /** RenderPool.admit once the pool is known to be open. */
  admit(bytes: number, what: string, signal: AbortSignal | undefined, heldBytes: number, place?: Reservation): Promise<Lease> {
    // RSS only as a last resort, and only while other jobs run: their end brings it down, so
    // this can never refuse for good (an idle replica over the ceiling is /healthz's concern).
    if (this.rssCeiling > 0 && this.budget.state.running > 0 && process.memoryUsage.rss() > this.rssCeiling) {
      return Promise.reject(overRss(this.rssCeiling, this.retryAfterSeconds));
    }
    return this.budget.acquire(bytes, what, signal, place).then((lease) => {
      if (heldBytes < HAND_BACK_MIN_BYTES) return lease;
      // A job whose buffers in this process (`heldBytes` of `bytes`; an encoder's working set is
      // not) were this big dropped them: collect them now that it has ended (hand-back.ts). A
      // full collection stops the event loop, so only then.
      return { bytes, release: () => (lease.release(), handBack()) };
    });
  }
}
