import { once } from 'node:events';
import Fastify from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import metricsPlugin from '../../../src/http/plugins/metrics.js';
import redisPlugin, { type RedisSettings } from '../../../src/http/plugins/redis.js';
import type { CacheEntry } from '../../../src/cache/types.js';
import { next, redisBinary, startRedis, type RedisProcess } from '../../helpers/redis-server.js';

const settings = (url: string): RedisSettings => ({
  url, ttlSeconds: 60, maxEntryBytes: 1 << 20, lockTtlMs: 2_000, waitDeadlineMs: 10_000,
  commandTimeoutMs: 300, connectTimeoutMs: 500, failureThreshold: 2, breakerOpenMs: 60_000, namespace: 'plugin-test:',
});

async function replica(url: string) {
  const app = Fastify({ logger: false });
  await app.register(metricsPlugin);
  await app.register(redisPlugin, { settings: settings(url) });
  await app.ready();
  return app;
}

const entry = (tag: string): CacheEntry => ({ body: Buffer.from(tag), contentType: 'image/png', etag: `"${tag}"`, headers: {}, createdAt: 0 });

describe('redis plugin', () => {
  it('decorates null and adds nothing when no Redis is configured', async () => {
    const app = Fastify({ logger: false });
    await app.register(metricsPlugin);
    await app.register(redisPlugin, { settings: null });
    expect(app.sharedRedis).toBeNull();
    await app.close();
  });
});

describe.skipIf(!redisBinary)('redis plugin on a real redis-server', () => {
  let server: RedisProcess;
  beforeAll(async () => { server = await startRedis(); });
  afterAll(async () => { await server?.stop(); });

  it('ten concurrent requests on each of two replicas render once', async () => {
    const [a, b] = [await replica(server.url), await replica(server.url)];
    await Promise.all([a.sharedRedis!.tier.link.ready(), b.sharedRedis!.tier.link.ready()]);
    let renders = 0;
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    // The work stores its entry before it resolves, as a render does (renderRendition stores in
    // every tier inside the flight); the flight itself only reads the shared tier.
    const work = async () => {
      renders += 1;
      await gate;
      await a.sharedRedis!.tier.set('k', entry('woven'));
      return entry('woven');
    };
    const leading = once(a.sharedRedis!.lock, 'leader');
    const onA = Array.from({ length: 10 }, () => a.sharedRedis!.flight.run('k', work));
    await leading;
    const waiting = once(b.sharedRedis!.lock, 'wait');
    const onB = Array.from({ length: 10 }, () => b.sharedRedis!.flight.run('k', work));
    await waiting;
    release();
    const results = await Promise.all([...onA, ...onB]);
    expect(renders).toBe(1);
    for (const r of results) expect(r.value).toEqual(entry('woven'));
    const text = await a.metrics.registry.metrics();
    expect(text).toMatch(/foldwise_replica_flight_total\{event="leader"\} 1/);
    expect(text).toMatch(/foldwise_redis_up 1/);
    expect(text).toMatch(/foldwise_redis_breaker_state 0/);
    await Promise.all([a.close(), b.close()]);
  });

  it('with Redis gone: renders alone, the breaker opens, and the metrics say so', async () => {
    const app = await replica(server.url);
    const shared = app.sharedRedis!;
    await shared.tier.link.ready();
    const dropped = next(shared.tier.link.client, 'close');
    await server.kill();
    await dropped;
    let renders = 0;
    for (let i = 0; i < 3; i++) {
      const r = await shared.flight.run(`gone-${i}`, async () => { renders += 1; return entry('x'); });
      expect(r.value).toEqual(entry('x'));
    }
    expect(renders).toBe(3);
    expect(shared.health()).toEqual({ status: 'down', breaker: 'open' });
    const text = await app.metrics.registry.metrics();
    expect(text).toMatch(/foldwise_redis_breaker_state 2/);
    expect(text).toMatch(/foldwise_redis_breaker_transitions_total\{to="open"\} 1/);
    expect(text).toMatch(/foldwise_redis_up 0/);
    await app.close();
    await server.restart();
  });
});
