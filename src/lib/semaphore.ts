/**
 * A counting semaphore: at most `limit` calls of `run` inside at once, the rest wait in
 * arrival order, at most `maxWaiting` of them; past that `run` rejects with `refuse()` at once,
 * so the wait line (each waiter may hold an upload) is never unbounded. Bounds how many
 * manifests are built (sources decoded and held) at a time.
 */
export class Gate {
  private inside = 0;
  private readonly waiting: Array<() => void> = [];

  constructor(
    private readonly limit: number,
    private readonly maxWaiting = Number.POSITIVE_INFINITY,
    private readonly refuse: () => Error = () => new Error('the wait line is full'),
  ) {
    if (!(limit >= 1)) throw new RangeError(`limit must be >= 1, got ${limit}`);
    if (!(maxWaiting >= 0)) throw new RangeError(`maxWaiting must be >= 0, got ${maxWaiting}`);
  }

  async run<T>(work: () => Promise<T>): Promise<T> {
    if (this.inside >= this.limit && this.waiting.length >= this.maxWaiting) throw this.refuse();
    if (this.inside >= this.limit) await new Promise<void>((resolve) => this.waiting.push(resolve));
    else this.inside++;
    try {
      return await work();
    } finally {
      // Hand the slot straight to the next waiter, or give it back.
      const next = this.waiting.shift();
      if (next) next();
      else this.inside--;
    }
  }
}
