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
  /** Requests waiting, unread, for a place in the line (MemoryBudget.enter). */
  lobby: number;
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

interface Guest {
  /** Hands the guest the place just reserved for it. */
  seat: (place: Reservation) => void;
}

export interface BudgetOptions {
  budgetBytes: number;
  /** Jobs holding bytes at once, whatever their size (decode, resample and encode each run on a thread). */
  maxRunning: number;
  /** Jobs allowed to wait; past it a job is refused at once. */
  maxWaiting: number;
  /** Longest wait for room before ERR_OVERLOADED (for a place in the line, and again for memory). */
  maxWaitMs: number;
  retryAfterSeconds: number;
  /** Requests that may wait, unread, for a place in the line (enter); past it, and with 0, enter refuses at once. */
  maxLobby?: number;
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
  private readonly lobby: Guest[] = [];
  /** Each held reservation's end, without waking the lobby (acquire wakes it once the job is placed). */
  private readonly ends = new WeakMap<Reservation, () => void>();

  constructor(private readonly opts: BudgetOptions) {
    if (!(opts.budgetBytes > 0)) throw new RangeError('budgetBytes must be positive');
    if (!(opts.maxRunning >= 1 && Number.isInteger(opts.maxRunning))) throw new RangeError('maxRunning must be a positive integer');
  }

  get state(): MemoryState {
    const { admitted, running, peak } = this;
    return { admittedBytes: admitted, budgetBytes: this.opts.budgetBytes, running, waiting: this.line.length, peakAdmittedBytes: peak, lobby: this.lobby.length };
  }

  /** Most jobs in flight (running + waiting) before refusals start. */
  get bound(): number {
    return this.opts.maxRunning + this.opts.maxWaiting;
  }

  /**
   * A place in the wait line for a job about to read its source, or the 503 acquire would give
   * it. While jobs can start at once (fewer than maxRunning run and none waits) as many may read
   * as there are places to run and to wait; otherwise the line's free places are what may read,
   * each reserved by one job: a caller that
   * read first and asked after would let every request arriving while a place is free read its
   * source (for an HTTP origin, fetch it), all but one then refused. Pass the reservation to
   * `acquire`, or release it.
   * @throws FoldwiseError ERR_OVERLOADED when the line's places are taken or reserved
   */
  reserve(): Reservation {
    if (!this.placeFree()) {
      throw this.overloaded(`${this.line.length} jobs are already waiting for memory and ${this.reserved} reading their sources`);
    }
    return this.place();
  }

  /**
   * reserve, but a request that finds the line's places taken waits for one in the lobby,
   * holding nothing (its source unread), at most `maxWaitMs`, in arrival order: a burst a
   * little larger than the line (two visitors opening a page of new pictures) is served a
   * moment later instead of refused. Refuses at once when the lobby is full (`maxLobby`).
   * @throws FoldwiseError ERR_OVERLOADED; the signal's reason when it aborts while waiting.
   */
  async enter(signal?: AbortSignal): Promise<Reservation> {
    signal?.throwIfAborted();
    this.seatGuests();
    if (this.placeFree() && this.lobby.length === 0) return this.place();
    const { maxWaitMs, maxLobby = 0 } = this.opts;
    if (this.lobby.length >= maxLobby) {
      throw this.overloaded(`${this.line.length} jobs are already waiting for memory, ${this.reserved} reading their sources and ${this.lobby.length} waiting for a place`);
    }
    return waitIn<Guest, Reservation>(this.lobby, (take) => ({ seat: take }), maxWaitMs, () => this.overloaded(`no place in the wait line within ${maxWaitMs} ms`), signal);
  }

  /**
   * Whether a job may reserve a place now: while jobs can start at once, as many may read side by
   * side as there are places to run and to wait, not taken or reserved (so a burst on an idle
   * replica does not read sources the line cannot hold); while none can, the line's free places.
   */
  private placeFree(): boolean {
    const { length } = this.line;
    const { maxRunning, maxWaiting } = this.opts;
    const busy = this.running >= maxRunning || length > 0;
    return busy ? length + this.reserved < maxWaiting : this.running + this.reserved < maxRunning + maxWaiting;
  }

  private place(): Reservation {
    this.reserved += 1;
    let held = true;
    const end = () => {
      if (!held) return false;
      held = false;
      this.reserved -= 1;
      return true;
    };
    const place: Reservation = { release: () => end() && this.seatGuests() };
    this.ends.set(place, end);
    return place;
  }

  /** Gives the lobby's first guests the places that are free now. */
  private seatGuests(): void {
    while (this.lobby.length > 0 && this.placeFree()) this.lobby[0].seat(this.place());
  }

  /**
   * A lease of `bytes` once they fit. `what` names the job in a 413's detail; `place` its
   * reservation, which ends here (taken into the line, or given back on a refusal).
   * @throws FoldwiseError ERR_SOURCE_TOO_COSTLY, ERR_OVERLOADED; the signal's reason when it aborts.
   */
  acquire(bytes: number, what: string, signal?: AbortSignal, place?: Reservation): Promise<Lease> {
    const { budgetBytes, maxWaiting, maxWaitMs } = this.opts;
    // The place ends here; the lobby is woken once this job is placed (or refused), so a guest
    // cannot take the place this job is about to use.
    if (place) this.ends.get(place)?.();
    // placed() runs up to its wait at once: the job is granted, in the line or refused before
    // the lobby is given what is left.
    const placed = this.placed(bytes, what, budgetBytes, maxWaiting, maxWaitMs, signal);
    this.seatGuests();
    return placed;
  }

  private async placed(bytes: number, what: string, budgetBytes: number, maxWaiting: number, maxWaitMs: number, signal?: AbortSignal): Promise<Lease> {
    signal?.throwIfAborted();
    if (bytes > budgetBytes) {
      throw new FoldwiseError(
        'ERR_SOURCE_TOO_COSTLY',
        `${what} needs about ${mib(bytes)} MiB (${bytes} bytes) of working memory; this replica's budget is ${mib(budgetBytes)} MiB (${budgetBytes} bytes)`,
      );
    }
    if (this.line.length === 0 && this.fits(bytes)) return this.grant(bytes);
    if (this.line.length >= maxWaiting) throw this.overloaded(`${this.line.length} jobs are already waiting for memory`);
    const late = () => this.overloaded(`no room for ${mib(bytes)} MiB within ${maxWaitMs} ms`);
    // A job that left the head of the line may have held back smaller ones behind it: pump after each leaves.
    await waitIn<Waiter, void>(this.line, (take) => ({ bytes, grant: () => take() }), maxWaitMs, late, signal, () => this.pump());
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

  /** Admits waiting jobs from the head of the line while they fit, then seats the lobby's guests in the places that frees. */
  private pump(): void {
    while (this.line.length > 0 && this.fits(this.line[0].bytes)) {
      const next = this.line[0];
      this.take(next.bytes);
      next.grant();
    }
    this.seatGuests();
  }

  private overloaded(why: string): FoldwiseError {
    const s = this.opts.retryAfterSeconds;
    return new FoldwiseError('ERR_OVERLOADED', `the render memory budget is in use (${why}); retry in ${s} s`, {
      headers: { 'retry-after': String(s) },
    });
  }
}

/**
 * Waits in `queue` as the entry `make` builds, until the entry's `take` is called (it resolves
 * with the value), `ms` pass (rejects with `late()`), or the signal aborts (its reason); the entry
 * leaves the queue either way, and `after` runs once it has.
 */
function waitIn<E, T>(queue: E[], make: (take: (value: T) => void) => E, ms: number, late: () => Error, signal?: AbortSignal, after?: () => void): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const entry = make((value) => done(() => resolve(value)));
    const timer = setTimeout(() => done(() => reject(late())), ms);
    const onAbort = () => done(() => reject(signal?.reason));
    const done = (settle: () => void) => {
      clearTimeout(timer);
      signal?.removeEventListener('abort', onAbort);
      const at = queue.indexOf(entry);
      if (at >= 0) queue.splice(at, 1);
      settle();
      after?.();
    };
    signal?.addEventListener('abort', onAbort, { once: true });
    queue.push(entry);
  });
}

function mib(bytes: number): string {
  return (bytes / 2 ** 20).toFixed(0);
}
