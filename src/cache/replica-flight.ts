import type { RedisFlight } from './redis/lock.js';
import type { CacheEntry, CacheTier } from './types.js';
import { type Flight, type FlightResult, SingleFlight } from '../lib/single-flight.js';

/**
 * Single-flight in two layers: in-process first (concurrent requests on this replica share one
 * promise), then across replicas through a Redis lock. The work renders and stores the entry
 * in every tier before it resolves (renderRendition: `ctx.cache.set` inside the flight), so
 * the shared tier has it when the waiters are woken; a replica that waited on another takes
 * the holder's entry from the shared tier instead of running the work. Each render is stored
 * once, by the work: this flight only reads the tier.
 */
export class ReplicaFlight implements Flight<CacheEntry> {
  private readonly local: SingleFlight<CacheEntry>;

  constructor(
    private readonly redis: RedisFlight,
    private readonly tier: CacheTier,
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
      });
      return entry;
    }, signal);
  }
}
