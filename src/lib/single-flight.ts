/** What a caller of a flight learns: the value and whether it led the work or joined it. */
export interface FlightResult<T> {
  value: T;
  leader: boolean;
}

/**
 * Runs one piece of work per key at a time; concurrent callers of a key share its result.
 * `signal` is the caller's: when it aborts, that caller stops waiting (rejected with the
 * signal's reason), and once every caller has stopped the work's own signal aborts too.
 */
export interface Flight<V> {
  run(key: string, work: (signal: AbortSignal) => Promise<V>, signal?: AbortSignal): Promise<FlightResult<V>>;
}

interface InFlight<V> {
  promise: Promise<V>;
  /** Callers that joined after the first. */
  joined: number;
  /** Callers still waiting; a caller without a signal never stops waiting. */
  waiting: number;
  controller: AbortController;
}

/** `work`, or a rejection with `signal`'s reason as soon as it aborts; `leave` runs once either way the caller stops waiting early. */
function waitFor<T>(work: Promise<T>, signal: AbortSignal | undefined, leave: () => void): Promise<T> {
  if (!signal) return work;
  if (signal.aborted) {
    leave();
    return Promise.reject(signal.reason);
  }
  return new Promise<T>((resolve, reject) => {
    const onAbort = () => {
      leave();
      reject(signal.reason);
    };
    signal.addEventListener('abort', onAbort, { once: true });
    work.then(resolve, reject).finally(() => signal.removeEventListener('abort', onAbort));
  });
}

/**
 * In-process single-flight: the first caller of a key runs the work; callers arriving while it
 * runs wait for the same promise (and its rejection). The key is free again once it settles, so
 * a failure is never remembered. The work is aborted (its signal, with the last caller's
 * reason) once no caller waits any more: a reference count, so one caller who gives up never
 * cancels work that others still wait for. `onJoin` reports each joiner (tests and metrics).
 */
export class SingleFlight<V = unknown> implements Flight<V> {
  private readonly flights = new Map<string, InFlight<V>>();

  constructor(private readonly onJoin?: (key: string, waiters: number) => void) {}

  /** Keys in flight now. */
  get size(): number {
    return this.flights.size;
  }

  /** Callers still waiting for `key`'s work (0 when none is in flight). */
  waiting(key: string): number {
    return this.flights.get(key)?.waiting ?? 0;
  }

  async run(key: string, work: (signal: AbortSignal) => Promise<V>, signal?: AbortSignal): Promise<FlightResult<V>> {
    const current = this.flights.get(key);
    if (current) {
      current.joined += 1;
      current.waiting += 1;
      this.onJoin?.(key, current.joined);
      const value = await waitFor(current.promise, signal, () => this.leave(current, signal));
      return { value, leader: false };
    }
    const controller = new AbortController();
    const promise = (async () => work(controller.signal))();
    // The work may settle after every caller left: its rejection is nobody's to report.
    promise.catch(() => undefined);
    const flight: InFlight<V> = { promise, joined: 0, waiting: 1, controller };
    this.flights.set(key, flight);
    promise.finally(() => {
      if (this.flights.get(key) === flight) this.flights.delete(key);
    }).catch(() => undefined);
    return { value: await waitFor(promise, signal, () => this.leave(flight, signal)), leader: true };
  }

  private leave(flight: InFlight<V>, signal: AbortSignal | undefined): void {
    flight.waiting -= 1;
    if (flight.waiting === 0) flight.controller.abort(signal?.reason);
  }
}
