/**
 * Idempotence for ingest: one computation per key at a time (single-flight), and finished
 * results kept in a small LRU so the same upload twice does the work once.
 */
import { LRUCache } from 'lru-cache';

export class OnceByKey<T extends {}> {
  private readonly inFlight = new Map<string, Promise<T>>();
  private readonly done: LRUCache<string, T>;

  constructor(maxEntries: number) {
    this.done = new LRUCache<string, T>({ max: maxEntries });
  }

  /** The cached result for `key`, the promise already computing it, or a new computation. */
  run(key: string, compute: () => Promise<T>): { value: Promise<T>; reused: boolean } {
    const cached = this.done.get(key);
    if (cached !== undefined) return { value: Promise.resolve(cached), reused: true };
    const pending = this.inFlight.get(key);
    if (pending) return { value: pending, reused: true };
    const value = compute().then(
      (v) => {
        this.done.set(key, v);
        return v;
      },
    ).finally(() => this.inFlight.delete(key));
    this.inFlight.set(key, value);
    return { value, reused: false };
  }

  /** Whether `key` has a finished result. */
  has(key: string): boolean {
    return this.done.has(key);
  }
}
