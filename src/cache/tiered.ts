import type { CacheEntry, CacheTier } from './types.js';

/** A hit and the tier that answered it. */
export interface CacheHit {
  entry: CacheEntry;
  tier: string;
}

export type TierErrorHandler = (tier: string, op: 'get' | 'set', error: unknown) => void;
export type TierStoreHandler = (tier: string, bytes: number) => void;

/**
 * Tiers in order (L1 memory, then the shared tier: disk by default, Redis when configured).
 * A lookup tries each in turn and copies a lower-tier hit into the tiers above it; a store
 * writes every tier. A failing tier counts as a miss and is reported, never thrown: the cache
 * must not turn a renderable request into an error.
 */
export class TieredCache {
  constructor(
    readonly tiers: readonly CacheTier[],
    private readonly onError: TierErrorHandler = () => undefined,
    private readonly onStored: TierStoreHandler = () => undefined,
  ) {}

  async get(key: string): Promise<CacheHit | undefined> {
    for (let i = 0; i < this.tiers.length; i++) {
      const tier = this.tiers[i];
      let entry: CacheEntry | undefined;
      try {
        entry = await tier.get(key);
      } catch (e) {
        this.onError(tier.name, 'get', e);
        continue;
      }
      if (entry) {
        if (i > 0) await this.store(this.tiers.slice(0, i), key, entry);
        return { entry, tier: tier.name };
      }
    }
    return undefined;
  }

  /** Stores still being written. */
  private readonly writing = new Set<Promise<void>>();

  /**
   * Stores in every tier. The memory tier has the entry when this returns (its set runs before
   * any await), so a caller may answer then while the disk file (written durably: fsync,
   * rename) and Redis follow (renderRendition's answerFirst); `settled()` waits for what is
   * still being written, and deletions and close() call it first, so neither races a late write.
   */
  async set(key: string, entry: CacheEntry): Promise<void> {
    const writing = this.store(this.tiers, key, entry);
    this.writing.add(writing);
    try {
      await writing;
    } finally {
      this.writing.delete(writing);
    }
  }

  /** Resolves once every store begun so far has ended. */
  async settled(): Promise<void> {
    while (this.writing.size > 0) await Promise.allSettled([...this.writing]);
  }

  private async store(tiers: readonly CacheTier[], key: string, entry: CacheEntry): Promise<void> {
    const results = await Promise.allSettled(tiers.map((t) => t.set(key, entry)));
    results.forEach((r, i) => {
      if (r.status === 'rejected') this.onError(tiers[i].name, 'set', r.reason);
      else this.onStored(tiers[i].name, entry.body.length);
    });
  }

  async close(): Promise<void> {
    await this.settled();
    await Promise.allSettled(this.tiers.map((t) => t.close?.()));
  }
}
