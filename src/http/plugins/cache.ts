import { EventEmitter } from 'node:events';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';
import { type DiskEvent, DiskTier } from '../../cache/disk.js';
import { MemoryTier } from '../../cache/memory.js';
import { type Flight, SingleFlight } from '../../lib/single-flight.js';
import { TieredCache } from '../../cache/tiered.js';
import type { CacheEntry, CacheTier, TierHealth } from '../../cache/types.js';
import type { Config } from '../../config.js';

/** The rendition cache as routes see it: the tiers, single-flight, and its events. */
export interface RenditionCache {
  cache: TieredCache;
  flight: Flight<CacheEntry>;
  /** 'join' (key, waiters) when a request joins a render already in flight. */
  events: EventEmitter;
  /** Each tier's health by name, and tiers switched off at start with the reason (for /readyz). */
  health(): Record<string, TierHealth>;
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
  flight?: Flight<CacheEntry>;
}

/** Bytes a tier holds now, where it can say. */
function tierBytes(tier: CacheTier): number | undefined {
  const b = (tier as { bytes?: unknown }).bytes;
  return typeof b === 'number' ? b : undefined;
}

/**
 * The disk tier, or why it is off: a folder that cannot be created or written switches the
 * tier off (the replica serves from memory and renders) rather than stopping the process.
 */
async function openDisk(app: FastifyInstance, cache: Config['cache']): Promise<DiskTier | TierHealth> {
  try {
    return await DiskTier.open(cache.dir, cache.diskBytes);
  } catch (err) {
    const reason = (err as NodeJS.ErrnoException).code ?? (err as Error).message;
    app.log.error({ err, dir: cache.dir }, `disk cache tier OFF: the folder ${cache.dir} cannot be used (${reason}); serving from memory and rendering`);
    return { ok: false, detail: `off: ${cache.dir} cannot be used (${reason})` };
  }
}

function onDiskEvent(app: FastifyInstance, event: DiskEvent): void {
  if (event.kind === 'corrupt') {
    app.metrics.cacheCorrupt.inc({ tier: 'disk' });
    app.log.warn({ file: event.key, detail: event.detail }, 'damaged disk cache entry deleted; rendering it again');
  } else {
    app.metrics.cacheFull.inc({ tier: 'disk' });
    app.log.error({ err: event.error }, 'disk cache is full: the rendition is served but not stored on disk');
  }
}

/**
 * The tier list (L1 memory bounded in bytes, then one shared tier: the disk folder unless
 * another is given) with single-flight in front. Tiers are opened at registration and closed
 * with the app.
 */
async function cachePlugin(app: FastifyInstance, opts: CachePluginOptions): Promise<void> {
  const { metrics } = app;
  const tiers: CacheTier[] = [];
  const off: Record<string, TierHealth> = {};
  if (opts.cache.memoryBytes > 0) tiers.push(new MemoryTier(opts.cache.memoryBytes));
  if (opts.sharedTier) tiers.push(opts.sharedTier);
  else if (opts.cache.diskBytes > 0) {
    const disk = await openDisk(app, opts.cache);
    if (disk instanceof DiskTier) tiers.push(disk);
    else off.disk = disk;
  }
  for (const tier of tiers) if (tier instanceof DiskTier) tier.listen((event) => onDiskEvent(app, event));
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

  const health = (): Record<string, TierHealth> => {
    const all: Record<string, TierHealth> = { ...off };
    for (const t of tiers) if (t.health) all[t.name] = t.health();
    return all;
  };
  app.decorate('renditionCache', { cache, flight, events, health });
  app.addHook('onClose', async () => cache.close());
}

export default fp(cachePlugin, { name: 'foldwise-cache', fastify: '5.x', dependencies: ['foldwise-metrics'] });
