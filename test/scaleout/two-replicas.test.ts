import { once } from 'node:events';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { redisBinary } from '../helpers/redis-server.js';
import { fleet, type Fleet, type Replica } from './replicas.js';

// Vertical 1-px stripes: a pattern that needs the real resampler (an analytic test input).
const stripes = (x: number) => (x % 2 ? [255, 255, 255] : [0, 0, 0]);

describe.skipIf(!redisBinary)('two replicas sharing one Redis', () => {
  let f: Fleet;
  let a: Replica;
  let b: Replica;

  beforeAll(async () => {
    f = await fleet({ name: 'stripes.png', width: 96, height: 64, pixel: stripes });
    ({ a, b } = f);
  });
  afterAll(() => f?.close());

  it('a rendition asked of both at once is rendered once; both answer the same bytes', async () => {
    const url = '/v1/renditions/stripes.png?width=48&format=png';
    a.origin.close();
    const reading = once(a.origin, 'read');
    const onA = a.app.inject(url);
    await Promise.race([reading, onA]); // A holds the lock and is rendering
    const waiting = once(b.app.sharedRedis!.lock, 'wait');
    const onB = b.app.inject(url);
    // B found the lock and waits for A (if B answered instead, the read count below says why).
    await Promise.race([waiting, onB]);
    a.origin.open();
    const [ra, rb] = await Promise.all([onA, onB]);
    expect([ra.statusCode, rb.statusCode]).toEqual([200, 200]);
    expect(a.origin.reads + b.origin.reads).toBe(1);
    expect(rb.headers.etag).toBe(ra.headers.etag);
    expect(rb.rawPayload.equals(ra.rawPayload)).toBe(true);
  });

  it('a render is sent to Redis once: the tiered cache stores it, the cross-replica flight only reads', async () => {
    // prefilter=none: no spectrum analysis, which the shared tier would store too.
    const stores = () => a.app.sharedRedis!.tier.counts.stores;
    const before = stores();
    const res = await a.app.inject('/v1/renditions/stripes.png?width=40&height=20&fit=fill&prefilter=none&format=png');
    expect(res.statusCode).toBe(200);
    await a.app.renditionCache.cache.settled(); // answered before the Redis write ended (answerFirst)
    expect(stores() - before).toBe(1);
  });

  it('many distinct renditions asked of both concurrently: one render each', async () => {
    const widths = [20, 24, 30, 36, 40];
    const before = a.origin.reads + b.origin.reads;
    const urls = widths.map((w) => `/v1/renditions/stripes.png?width=${w}&format=png`);
    const all = await Promise.all([...urls, ...urls].flatMap((u) => [a.app.inject(u), b.app.inject(u)]));
    expect(all.every((r) => r.statusCode === 200)).toBe(true);
    expect(a.origin.reads + b.origin.reads - before).toBe(widths.length);
  });

  it('a rendition made on one is a shared-tier hit on the other, reported in Server-Timing', async () => {
    const url = '/v1/renditions/stripes.png?width=16&format=webp';
    expect((await a.app.inject(url)).statusCode).toBe(200);
    // A answers before its Redis write ends (answerFirst): B asks once it has.
    await a.app.renditionCache.cache.settled();
    const fromB = await b.app.inject(url);
    expect(fromB.statusCode).toBe(200);
    expect(fromB.headers['server-timing']).toMatch(/hit-redis/);
    const again = await b.app.inject(url);
    expect(again.headers['server-timing']).toMatch(/hit-memory/);
    const metrics = (await b.app.inject('/metrics')).body;
    expect(metrics).toMatch(/foldwise_cache_lookups_total\{result="hit-redis"\} [1-9]/);
    expect(metrics).toMatch(/foldwise_redis_tier_operations_total\{result="hits"\} [1-9]/);
  });

  it('/readyz says ready with the Redis check when the shared tier is healthy', async () => {
    const res = await a.app.inject('/readyz');
    expect(res.statusCode).toBe(200);
    expect(res.json()).toMatchObject({ status: 'ready', checks: { redis: { ok: true } } });
  });
});
