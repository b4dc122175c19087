/**
 * Idempotence for ingest: one computation per key at a time (a SingleFlight), and finished
 * results kept in a small LRU so the same upload twice does the work once.
 */
import { LRUCache } from 'lru-cache';
import { SingleFlight } from './single-flight.js';

export class OnceByKey<T extends {}> {
  private readonly flight = new SingleFlight<T>();
  private readonly done: LRUCache<string, T>;

  constructor(maxEntries: number) {
    this.done = new LRUCache<string, T>({ max: maxEntries });
  }

  /** The cached result for `key`, the promise already computing it, or a new computation. */
  run(key: string, compute: () => Promise<T>): { value: Promise<T>; reused: boolean } {
    const cached = this.done.get(key);
    if (cached !== undefined) return { value: Promise.resolve(cached), reused: true };
    // SingleFlight.run looks the key up before its first await: `reused` is read at the same moment.
    const reused = this.flight.waiting(key) > 0;
    const value = this.flight.run(key, async () => {
      const v = await compute();
      this.done.set(key, v);
      return v;
    }).then((r) => r.value);
    return { value, reused };
  }

  /** Forgets the finished results `drop` picks (e.g. every manifest of a deleted source). */
  forgetWhere(drop: (value: T) => boolean): void {
    for (const [key, value] of this.done.entries()) if (drop(value)) this.done.delete(key);
  }

  /** Whether `key` has a finished result. */
  has(key: string): boolean {
    return this.done.has(key);
  }
}
