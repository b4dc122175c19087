/**
 * A counting semaphore: at most `limit` calls of `run` inside at once, the rest wait in
 * arrival order. Bounds how many manifests are built (sources decoded and held) at a time.
 */
export class Gate {
  private inside = 0;
  private readonly waiting: Array<() => void> = [];

  constructor(private readonly limit: number) {
    if (!(limit >= 1)) throw new RangeError(`limit must be >= 1, got ${limit}`);
  }

  async run<T>(work: () => Promise<T>): Promise<T> {
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
