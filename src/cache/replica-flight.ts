import type { RedisFlight } from './redis/lock.js';
import type { RedisTier } from './redis/tier.js';
import { type Flight, type FlightResult, SingleFlight } from '../lib/single-flight.js';
import type { CacheEntry } from './types.js';

/**
 * Single-flight in two layers: in-process first (concurrent requests on this replica share one
 * promise), then across replicas through a Redis lock. The work must resolve to the
 * CacheEntry it rendered: a replica that waited on another takes the holder's entry from the
 * shared tier instead of running the work. The caller stores what the work returns (the tiered
 * cache writes every tier), so the holder's store step here only makes sure the shared tier
 * has it before the waiters are woken.
 */
export class ReplicaFlight implements Flight<CacheEntry> {
  private readonly local: SingleFlight<CacheEntry>;

  constructor(
    private readonly redis: RedisFlight,
    private readonly tier: RedisTier,
    onJoin?: (key: string, waiters: number) => void,
  ) {
    this.local = new SingleFlight<CacheEntry>(onJoin);
  }

  run(key: string, work: (signal: AbortSignal) => Promise<CacheEntry>, signal?: AbortSignal): Promise<FlightResult<CacheEntry>> {
    // The local flight counts this replica's waiting callers; its signal aborts the work here.
    return this.local.run(key, async (abandoned) => {
      const { entry } = await this.redis.run(key, {
        lookup: () => this.tier.get(key),
        produce: () => work(abandoned),
        store: (e) => this.tier.set(key, e),
      });
      return entry;
    }, signal);
  }
}
