import { EventEmitter } from 'node:events';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';
import { DiskTier } from '../cache/disk.js';
import { MemoryTier } from '../cache/memory.js';
import { type Flight, SingleFlight } from '../cache/single-flight.js';
import { TieredCache } from '../cache/tiered.js';
import type { CacheTier } from '../cache/types.js';
import type { Config } from '../config.js';

/** The rendition cache as routes see it: the tiers, single-flight, and its events. */
export interface RenditionCache {
  cache: TieredCache;
  flight: Flight;
  /** 'join' (key, waiters) when a request joins a render already in flight. */
  events: EventEmitter;
}

declare module 'fastify' {
  interface FastifyInstance {
    renditionCache: RenditionCache;
  }
}

export interface CachePluginOptions {
  cache: Config['cache'];
  /** Replaces the disk tier as the shared tier (e.g. Redis). */
  sharedTier?: CacheTier;
  /** Replaces in-process single-flight (e.g. a cross-replica lock). */
  flight?: Flight;
}

/** Bytes a tier holds now, where it can say. */
function tierBytes(tier: CacheTier): number | undefined {
  const b = (tier as { bytes?: unknown }).bytes;
  return typeof b === 'number' ? b : undefined;
}

/**
 * The tier list (L1 memory bounded in bytes, then one shared tier: the disk folder unless
 * another is given) with single-flight in front. Tiers are opened at registration and closed
 * with the app.
 */
async function cachePlugin(app: FastifyInstance, opts: CachePluginOptions): Promise<void> {
  const tiers: CacheTier[] = [];
  if (opts.cache.memoryBytes > 0) tiers.push(new MemoryTier(opts.cache.memoryBytes));
  if (opts.sharedTier) tiers.push(opts.sharedTier);
  else if (opts.cache.diskBytes > 0) tiers.push(await DiskTier.open(opts.cache.dir, opts.cache.diskBytes));

  const { metrics } = app;
  const cache = new TieredCache(
    tiers,
    (tier, op, error) => {
      metrics.cacheErrors.inc({ tier, op });
      app.log.warn({ err: error, tier, op }, 'cache tier failed; treated as a miss');
    },
    (tier, bytes) => metrics.cacheStoredBytes.inc({ tier }, bytes),
  );
  const events = new EventEmitter();
  const flight = opts.flight ?? new SingleFlight((key, waiters) => events.emit('join', key, waiters));

  new Gauge({
    name: 'foldwise_cache_bytes',
    help: 'Bytes held per cache tier.',
    labelNames: ['tier'],
    registers: [metrics.registry],
    collect() {
      for (const t of tiers) {
        const b = tierBytes(t);
        if (b !== undefined) this.set({ tier: t.name }, b);
      }
    },
  });

  app.decorate('renditionCache', { cache, flight, events });
  app.addHook('onClose', async () => cache.close());
}

export default fp(cachePlugin, { name: 'foldwise-cache', fastify: '5.x', dependencies: ['foldwise-metrics'] });
