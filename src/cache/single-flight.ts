/** What a caller of a flight learns: the value and whether it led the work or joined it. */
export interface FlightResult<T> {
  value: T;
  leader: boolean;
}

/** Runs one piece of work per key at a time; concurrent callers of a key share its result. */
export interface Flight {
  run<T>(key: string, work: () => Promise<T>): Promise<FlightResult<T>>;
}

/**
 * In-process single-flight: the first caller of a key runs the work; callers arriving while it
 * runs wait for the same promise (and its rejection). The key is free again once it settles, so
 * a failure is never remembered. `onJoin` reports each joiner (used by tests and metrics).
 */
export class SingleFlight implements Flight {
  private readonly flights = new Map<string, { promise: Promise<unknown>; waiters: number }>();

  constructor(private readonly onJoin?: (key: string, waiters: number) => void) {}

  /** Keys in flight now. */
  get size(): number {
    return this.flights.size;
  }

  async run<T>(key: string, work: () => Promise<T>): Promise<FlightResult<T>> {
    const current = this.flights.get(key);
    if (current) {
      current.waiters += 1;
      this.onJoin?.(key, current.waiters);
      return { value: (await current.promise) as T, leader: false };
    }
    const promise = (async () => work())();
    const flight = { promise, waiters: 0 };
    this.flights.set(key, flight);
    try {
      return { value: await promise, leader: true };
    } finally {
      if (this.flights.get(key) === flight) this.flights.delete(key);
    }
  }
}
