import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Counter, Gauge } from 'prom-client';
import type { BreakerState } from '../../cache/breaker.js';
import { RedisLink, type LinkHealth } from '../../cache/redis/link.js';
import { RedisFlight } from '../../cache/redis/lock.js';
import { RedisTier, type RedisTierCounts } from '../../cache/redis/tier.js';
import { ReplicaFlight } from '../../cache/replica-flight.js';
import type { Config } from '../../config.js';

/** Settings of the shared Redis tier: config `redis` plus the URL from `cache.redisUrl`. */
export type RedisSettings = Config['redis'] & { url: string };

/** The plugin's settings from the app configuration; null when no Redis URL is set. */
export function redisSettings(config: Config): RedisSettings | null {
  return config.cache.redisUrl ? { ...config.redis, url: config.cache.redisUrl } : null;
}

/** The shared tier as the app sees it; `null` when no Redis is configured. */
export interface SharedRedis {
  tier: RedisTier;
  flight: ReplicaFlight;
  /** Cross-replica lock, with 'leader' / 'wait' / 'solo' events. */
  lock: RedisFlight;
  health(): LinkHealth;
}

declare module 'fastify' {
  interface FastifyInstance {
    sharedRedis: SharedRedis | null;
  }
}

const stateValue: Record<BreakerState, number> = { closed: 0, 'half-open': 1, open: 2 };

/**
 * Opens the Redis link (lazily: start-up never waits for Redis), builds the shared tier and the
 * cross-replica single-flight for the cache plugin, and exports their state as metrics. Must be
 * registered after the metrics plugin and before the cache plugin.
 */
async function redisPlugin(app: FastifyInstance, opts: { settings: RedisSettings | null }): Promise<void> {
  const { settings } = opts;
  if (!settings) {
    app.decorate('sharedRedis', null);
    return;
  }
  const link = new RedisLink({ ...settings, openMs: settings.breakerOpenMs, log: app.log });
  const tier = new RedisTier(link, settings);
  const lock = new RedisFlight(link, settings);
  const flight = new ReplicaFlight(lock, tier);
  const registers = [app.metrics.registry];

  const breakerGauge = new Gauge({
    name: 'foldwise_redis_breaker_state',
    help: 'Shared cache circuit breaker: 0 closed, 1 half-open, 2 open.',
    registers,
    collect() {
      this.set(stateValue[link.breaker.state]);
    },
  });
  const transitions = new Counter({
    name: 'foldwise_redis_breaker_transitions_total',
    help: 'Shared cache circuit breaker state changes, by the state entered.',
    labelNames: ['to'],
    registers,
  });
  link.breaker.onChange((to) => {
    transitions.inc({ to });
    breakerGauge.set(stateValue[to]);
  });
  new Gauge({
    name: 'foldwise_redis_up',
    help: 'Whether the shared cache connection is ready (1) or not (0).',
    registers,
    collect() {
      this.set(link.health().status === 'up' ? 1 : 0);
    },
  });
  const seen: RedisTierCounts = { hits: 0, misses: 0, stores: 0, oversize: 0, errors: 0 };
  new Counter({
    name: 'foldwise_redis_tier_operations_total',
    help: 'Shared cache tier operations: hits, misses, stores, oversize skips, errors.',
    labelNames: ['result'],
    registers,
    collect() {
      for (const k of Object.keys(seen) as Array<keyof RedisTierCounts>) {
        this.inc({ result: k }, tier.counts[k] - seen[k]);
        seen[k] = tier.counts[k];
      }
    },
  });
  const roles = new Counter({
    name: 'foldwise_replica_flight_total',
    help: 'Cross-replica single-flight: leader (took the lock), wait (another replica held it), solo (no lock).',
    labelNames: ['event'],
    registers,
  });
  for (const event of ['leader', 'wait', 'solo'] as const) lock.on(event, () => roles.inc({ event }));

  link.start();
  app.decorate('sharedRedis', { tier, flight, lock, health: () => link.health() });
  app.addHook('onClose', async () => link.close());
}

export default fp(redisPlugin, { name: 'foldwise-redis', fastify: '5.x', dependencies: ['foldwise-metrics'] });
