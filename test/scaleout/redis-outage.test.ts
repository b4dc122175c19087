import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { next, redisBinary } from '../helpers/redis-server.js';
import { fleet, type Fleet, type Replica } from './replicas.js';

const checks = (x: number, y: number) => ((x >> 1) + (y >> 1)) % 2 ? [200, 40, 40] : [30, 30, 120];

describe.skipIf(!redisBinary)('Redis killed under two replicas', () => {
  let f: Fleet;
  let a: Replica;
  let b: Replica;
  const url = (w: number) => `/v1/renditions/checks.png?width=${w}&format=png`;

  beforeAll(async () => {
    f = await fleet({ name: 'checks.png', width: 80, height: 60, pixel: checks });
    ({ a, b } = f);
  });
  afterAll(() => f?.close());

  it('keep serving from memory and by rendering, open the breaker, report degraded, then recover', async () => {
    // Before: a rendition in both replicas' memory (B got it through Redis).
    expect((await a.app.inject(url(40))).statusCode).toBe(200);
    await a.app.renditionCache.cache.settled(); // A answers before its Redis write ends (answerFirst)
    expect((await b.app.inject(url(40))).headers['server-timing']).toMatch(/hit-redis/);

    const dropped = [a, b].map((r) => next(r.app.sharedRedis!.tier.link.client, 'close'));
    await f.server.kill();
    await Promise.all(dropped);

    for (const r of [a, b]) {
      const cached = await r.app.inject(url(40));
      expect(cached.statusCode).toBe(200);
      expect(cached.headers['server-timing']).toMatch(/hit-memory/);
      for (const w of [21, 22, 23]) expect((await r.app.inject(url(w))).statusCode).toBe(200); // rendered alone
      // Tripped: open, or half-open if its open time ran out on a slow machine (never closed).
      const health = r.app.sharedRedis!.health();
      expect(health.status).toBe('down');
      expect(health.breaker).not.toBe('closed');
      const ready = await r.app.inject('/readyz');
      expect(ready.statusCode).toBe(200); // still takes traffic
      expect(ready.json()).toMatchObject({ status: 'degraded', checks: { redis: { ok: false } } });
      const metrics = (await r.app.inject('/metrics')).body;
      expect(metrics).toMatch(/foldwise_redis_breaker_state [12]/);
      expect(metrics).toMatch(/foldwise_redis_breaker_transitions_total\{to="open"\} [1-9]/);
      expect(r.logs.some((l) => l.level === 40 && /circuit opened/.test(l.msg))).toBe(true);
    }

    // Redis comes back (empty, on the same port): the clients reconnect by themselves.
    const back = [a, b].map((r) => next(r.app.sharedRedis!.tier.link.client, 'ready'));
    await f.server.restart();
    await Promise.all(back);
    let w = 50;
    // The breaker lets a probe through once its open time is over; requests drive it closed.
    await vi.waitFor(async () => {
      for (const r of [a, b]) expect((await r.app.inject(url(w++))).statusCode).toBe(200);
      for (const r of [a, b]) expect(r.app.sharedRedis!.health()).toEqual({ status: 'up', breaker: 'closed' });
    }, { timeout: 10_000, interval: 50 });
    await a.app.purgeBus!.whenSubscribed(); // readiness also waits for the purge channel again
    expect((await a.app.inject('/readyz')).json().status).toBe('ready');

    // The shared tier works again: made on A, a Redis hit on B.
    expect((await a.app.inject(url(33))).statusCode).toBe(200);
    await a.app.renditionCache.cache.settled();
    expect((await b.app.inject(url(33))).headers['server-timing']).toMatch(/hit-redis/);
    expect(a.logs.some((l) => /connection restored/.test(l.msg))).toBe(true);
  });
});
