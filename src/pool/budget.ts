import { FoldwiseError } from '../errors.js';

/** What the budget holds now, for /metrics, /readyz and tests. */
export interface MemoryState {
  /** Bytes of the jobs admitted and not yet ended (their estimates, not RSS). */
  admittedBytes: number;
  budgetBytes: number;
  /** Jobs admitted and not yet ended. */
  running: number;
  /** Jobs waiting for room. */
  waiting: number;
  /** Highest admittedBytes seen since start (never above budgetBytes). */
  peakAdmittedBytes: number;
}

/** A job's hold on the budget: call `release` when its last byte is gone (extra calls are ignored). */
export interface Lease {
  readonly bytes: number;
  release(): void;
}

/**
 * A place in the wait line, taken before a job's source is read (MemoryBudget.reserve) and
 * ended by `acquire` (the job then waits or runs on its own account), or by `release` when the
 * job ends before it asks for memory; extra calls are ignored.
 */
export interface Reservation {
  release(): void;
}

interface Waiter {
  bytes: number;
  grant: () => void;
}

export interface BudgetOptions {
  budgetBytes: number;
  /** Jobs holding bytes at once, whatever their size (decode, resample and encode each run on a thread). */
  maxRunning: number;
  /** Jobs allowed to wait; past it a job is refused at once. */
  maxWaiting: number;
  /** Longest wait for room before ERR_OVERLOADED. */
  maxWaitMs: number;
  retryAfterSeconds: number;
}

/**
 * Admission by memory: every job (decode, resample, encode, the upload hook's ladder) states
 * its peak bytes before it starts (src/pool/cost.ts) and runs only while the sum of the
 * admitted estimates stays within `budgetBytes`. First come, first served: a job that does not
 * fit waits, and so do the ones behind it (a large job is not starved by small ones). A job
 * that can never fit is refused with 413 (ERR_SOURCE_TOO_COSTLY); one that waits longer than
 * `maxWaitMs` gets 503 ERR_OVERLOADED with Retry-After; one whose signal aborts leaves the line.
 * The sum goes back to 0 when the jobs end, by construction, whatever the process's RSS does.
 */
export class MemoryBudget {
  private admitted = 0;
  private running = 0;
  private peak = 0;
  /** Places reserved by jobs still reading their sources. */
  private reserved = 0;
  private readonly line: Waiter[] = [];

  constructor(private readonly opts: BudgetOptions) {
    if (!(opts.budgetBytes > 0)) throw new RangeError('budgetBytes must be positive');
    if (!(opts.maxRunning >= 1 && Number.isInteger(opts.maxRunning))) throw new RangeError('maxRunning must be a positive integer');
  }

  get state(): MemoryState {
    const { admitted, running, peak } = this;
    return { admittedBytes: admitted, budgetBytes: this.opts.budgetBytes, running, waiting: this.line.length, peakAdmittedBytes: peak };
  }

  /** Most jobs in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.opts.maxRunning + this.opts.maxWaiting;
  }

  /**
   * A place in the wait line for a job about to read its source, or the 503 acquire would give
   * it. While jobs can start at once (fewer than maxRunning run and none waits) anyone may read;
   * otherwise the line's free places are what may read, each reserved by one job: a caller that
   * read first and asked after would let every request arriving while a place is free read its
   * source (for an HTTP origin, fetch it), all but one then refused. Pass the reservation to
   * `acquire`, or release it.
   * @throws FoldwiseError ERR_OVERLOADED when the line's places are taken or reserved
   */
  reserve(): Reservation {
    const { length } = this.line;
    const busy = this.running >= this.opts.maxRunning || length > 0;
    if (busy && length + this.reserved >= this.opts.maxWaiting) {
      throw this.overloaded(`${length} jobs are already waiting for memory and ${this.reserved} reading their sources`);
    }
    this.reserved += 1;
    let held = true;
    return {
      release: () => {
        if (!held) return;
        held = false;
        this.reserved -= 1;
      },
    };
  }

  /**
   * A lease of `bytes` once they fit. `what` names the job in a 413's detail; `place` its
   * reservation, which ends here (taken into the line, or given back on a refusal).
   * @throws FoldwiseError ERR_SOURCE_TOO_COSTLY, ERR_OVERLOADED; the signal's reason when it aborts.
   */
  async acquire(bytes: number, what: string, signal?: AbortSignal, place?: Reservation): Promise<Lease> {
    const { budgetBytes, maxWaiting, maxWaitMs } = this.opts;
    place?.release();
    signal?.throwIfAborted();
    if (bytes > budgetBytes) {
      throw new FoldwiseError(
        'ERR_SOURCE_TOO_COSTLY',
        `${what} needs about ${mib(bytes)} MiB (${bytes} bytes) of working memory; this replica's budget is ${mib(budgetBytes)} MiB (${budgetBytes} bytes)`,
      );
    }
    if (this.line.length === 0 && this.fits(bytes)) return this.grant(bytes);
    if (this.line.length >= maxWaiting) throw this.overloaded(`${this.line.length} jobs are already waiting for memory`);
    await new Promise<void>((resolve, reject) => {
      const waiter: Waiter = { bytes, grant: () => done(resolve) };
      const timer = setTimeout(() => done(() => reject(this.overloaded(`no room for ${mib(bytes)} MiB within ${maxWaitMs} ms`))), maxWaitMs);
      const onAbort = () => done(() => reject(signal?.reason));
      const done = (settle: () => void) => {
        clearTimeout(timer);
        signal?.removeEventListener('abort', onAbort);
        const at = this.line.indexOf(waiter);
        if (at >= 0) this.line.splice(at, 1);
        settle();
        // A job that left the head of the line may have held back smaller ones behind it.
        this.pump();
      };
      signal?.addEventListener('abort', onAbort, { once: true });
      this.line.push(waiter);
    });
    return this.lease(bytes);
  }

  private fits(bytes: number): boolean {
    return this.running < this.opts.maxRunning && this.admitted + bytes <= this.opts.budgetBytes;
  }

  private grant(bytes: number): Lease {
    this.take(bytes);
    return this.lease(bytes);
  }

  private take(bytes: number): void {
    this.admitted += bytes;
    this.running += 1;
    this.peak = Math.max(this.peak, this.admitted);
  }

  private lease(bytes: number): Lease {
    let held = true;
    return {
      bytes,
      release: () => {
        if (!held) return;
        held = false;
        this.admitted -= bytes;
        this.running -= 1;
        this.pump();
      },
    };
  }

  /** Admits waiting jobs from the head of the line while they fit. */
  private pump(): void {
    while (this.line.length > 0 && this.fits(this.line[0].bytes)) {
      const next = this.line[0];
      this.take(next.bytes);
      next.grant();
    }
  }

  private overloaded(why: string): FoldwiseError {
    const s = this.opts.retryAfterSeconds;
    return new FoldwiseError('ERR_OVERLOADED', `the render memory budget is in use (${why}); retry in ${s} s`, {
      headers: { 'retry-after': String(s) },
    });
  }
}

function mib(bytes: number): string {
  return (bytes / 2 ** 20).toFixed(0);
}
