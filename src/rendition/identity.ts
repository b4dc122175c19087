import { LRUCache } from 'lru-cache';
import { SingleFlight } from '../lib/single-flight.js';
import type { Origin, SourceIdentity } from '../origins/types.js';

/**
 * Remembers each source's identity for a short time, so a cache hit costs no file-system or
 * upstream round trip (the idea of an open-file cache; common practice). A source replaced
 * within `ttlMs` is noticed when its memo expires; failures are never remembered, and
 * concurrent look-ups of one path share one call. `ttlMs` 0 asks the origin every time.
 */
export class IdentityMemo {
  private readonly memo?: LRUCache<string, SourceIdentity>;
  private readonly pending = new SingleFlight<SourceIdentity>();

  constructor(
    private readonly origin: Origin,
    ttlMs: number,
    maxEntries = 10_000,
    now?: () => number,
  ) {
    if (ttlMs > 0) {
      this.memo = new LRUCache<string, SourceIdentity>({
        max: maxEntries,
        ttl: ttlMs,
        ttlAutopurge: false,
        // Read the clock on every look-up (no coarse caching of "now").
        ttlResolution: 0,
        ...(now ? { perf: { now } } : {}),
      });
    }
  }

  async identify(path: string): Promise<SourceIdentity> {
    const known = this.memo?.get(path);
    if (known) return known;
    const { value } = await this.pending.run(path, async () => {
      const id = await this.origin.identify(path);
      this.memo?.set(path, id);
      return id;
    });
    return value;
  }

  /** Forgets a path (e.g. after its read showed a different version). */
  forget(path: string): void {
    this.memo?.delete(path);
  }
}
