/**
 * A circuit breaker for a dependency that may be down, slow or flapping (the shared cache).
 *
 * closed    -> calls pass; `failureThreshold` consecutive failures or timeouts open it.
 * open      -> calls fail at once with BreakerOpenError until `openMs` has passed.
 * half-open -> one probe call passes (others fail at once); success closes, failure re-opens.
 */

export type BreakerState = 'closed' | 'open' | 'half-open';

export interface BreakerOptions {
  /** Consecutive failures (errors or timeouts) that open the breaker. */
  failureThreshold: number;
  /** How long it stays open before letting one probe through. */
  openMs: number;
  /** Bound on each call; a call that takes longer counts as a failure. */
  timeoutMs: number;
  /** Clock, injectable for tests. */
  now?: () => number;
}

export type BreakerListener = (to: BreakerState, from: BreakerState, cause?: unknown) => void;

/** Thrown without calling the dependency while the breaker is open. */
export class BreakerOpenError extends Error {
  constructor(name: string) {
    super(`${name}: circuit open`);
    this.name = 'BreakerOpenError';
  }
}

/** Thrown when a call exceeds the breaker's time bound. */
export class CallTimeoutError extends Error {
  constructor(name: string, ms: number) {
    super(`${name}: no answer within ${ms} ms`);
    this.name = 'CallTimeoutError';
  }
}

/** Runs a promise-returning call under a time bound; the timer never holds the process. */
export function withTimeout<T>(work: Promise<T>, ms: number, label: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const limit = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new CallTimeoutError(label, ms)), ms);
    timer.unref();
  });
  return Promise.race([work, limit]).finally(() => clearTimeout(timer));
}

/** Circuit breaker around one dependency; see the module comment for the states. */
export class CircuitBreaker {
  private current: BreakerState = 'closed';
  private failures = 0;
  private openedAt = 0;
  private probing = false;
  private readonly listeners: BreakerListener[] = [];
  private readonly now: () => number;

  constructor(
    readonly name: string,
    private readonly options: BreakerOptions,
  ) {
    if (!(options.failureThreshold >= 1) || !(options.openMs >= 0) || !(options.timeoutMs > 0)) {
      throw new RangeError('breaker: failureThreshold >= 1, openMs >= 0, timeoutMs > 0');
    }
    this.now = options.now ?? Date.now;
  }

  /** The state as of now (an open breaker whose wait is over reads half-open). */
  get state(): BreakerState {
    if (this.current === 'open' && this.now() - this.openedAt >= this.options.openMs) {
      this.move('half-open');
    }
    return this.current;
  }

  /** Calls `fn` through the breaker, bounded by `timeoutMs`. */
  async run<T>(fn: () => Promise<T>): Promise<T> {
    const state = this.state;
    if (state === 'open' || (state === 'half-open' && this.probing)) {
      throw new BreakerOpenError(this.name);
    }
    const probe = state === 'half-open';
    if (probe) this.probing = true;
    try {
      const result = await withTimeout(fn(), this.options.timeoutMs, this.name);
      this.succeeded();
      return result;
    } catch (e) {
      this.failed(e);
      throw e;
    } finally {
      if (probe) this.probing = false;
    }
  }

  /** Called on every state change (log line, metric). */
  onChange(listener: BreakerListener): void {
    this.listeners.push(listener);
  }

  private succeeded(): void {
    this.failures = 0;
    if (this.current !== 'closed') this.move('closed');
  }

  private failed(cause: unknown): void {
    this.failures += 1;
    if (this.current === 'half-open' || this.failures >= this.options.failureThreshold) {
      this.openedAt = this.now();
      if (this.current !== 'open') this.move('open', cause);
    }
  }

  private move(to: BreakerState, cause?: unknown): void {
    const from = this.current;
    this.current = to;
    for (const l of this.listeners) {
      try {
        l(to, from, cause);
      } catch {
        // A broken listener (logger, metric) must not change how the breaker behaves.
      }
    }
  }
}
