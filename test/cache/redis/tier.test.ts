import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Redis } from 'ioredis';
import { RedisLink } from '../../../src/cache/redis/link.js';
import { RedisTier } from '../../../src/cache/redis/tier.js';
import type { CacheEntry } from '../../../src/cache/types.js';
import { freePort, redisBinary, startRedis, type RedisProcess } from '../../helpers/redis-server.js';

const entry = (bytes: number[]): CacheEntry => ({
  body: Buffer.from(bytes),
  contentType: 'image/webp',
  etag: '"fw1-x"',
  headers: { 'Rendition-Plan': 'scale=2' },
  createdAt: 42,
});

describe.skipIf(!redisBinary)('RedisTier on a real redis-server', () => {
  let server: RedisProcess;
  let link: RedisLink;
  let tier: RedisTier;
  let raw: Redis;

  beforeAll(async () => {
    server = await startRedis();
    link = new RedisLink({ url: server.url, commandTimeoutMs: 500, namespace: 'tier-test:' });
    await link.ready();
    tier = new RedisTier(link, { ttlSeconds: 60, maxEntryBytes: 4096 });
    raw = new Redis(server.url);
  });
  afterAll(async () => {
    raw?.disconnect();
    await tier?.close();
    await server?.stop();
  });

  it('stores and reads an entry with every byte value intact', async () => {
    const all = Array.from({ length: 256 }, (_, i) => i);
    await tier.set('k1', entry(all));
    expect(await tier.get('k1')).toEqual(entry(all));
    expect(await tier.get('absent')).toBeUndefined();
  });

  it('sets the TTL on what it stores, under its namespace', async () => {
    await tier.set('k2', entry([1]));
    const ttl = await raw.ttl('tier-test:c:k2');
    expect(ttl).toBeGreaterThan(0);
    expect(ttl).toBeLessThanOrEqual(60);
  });

  it('skips entries over the size cap and counts them', async () => {
    const before = tier.counts.oversize;
    await tier.set('big', entry(new Array(5000).fill(7)));
    expect(await raw.exists('tier-test:c:big')).toBe(0);
    expect(tier.counts.oversize).toBe(before + 1);
  });

  it('reads foreign bytes under a key as a miss', async () => {
    await raw.set('tier-test:c:junk', 'not an entry');
    expect(await tier.get('junk')).toBeUndefined();
  });

  it('stores analysis values with typed arrays (getValue / setValue)', async () => {
    const analysis = { width: 4000, peaks: [{ fx: 0.31, fy: 0 }], power: new Float32Array([1, 0.5, 0.25]) };
    await tier.setValue('spectrum:a', analysis);
    expect(await tier.getValue('spectrum:a')).toEqual(analysis);
  });

  it('stores what it is given, each time: deciding that a render is stored once is the tiered cache\'s', async () => {
    const before = tier.counts.stores;
    await tier.set('twice', entry([5]));
    await tier.set('twice', { ...entry([6]), etag: '"fw1-y"' });
    expect(tier.counts.stores).toBe(before + 2);
    expect((await tier.get('twice'))?.etag).toBe('"fw1-y"');
  });

  it('deletes', async () => {
    await tier.set('gone', entry([3]));
    await tier.delete('gone');
    expect(await tier.get('gone')).toBeUndefined();
  });
});

describe('RedisTier with no Redis listening', () => {
  it('rejects quickly, opens its breaker, and then fails fast', async () => {
    const port = await freePort(); // nothing listens here
    const link = new RedisLink({ url: `redis://127.0.0.1:${port}`, commandTimeoutMs: 200, failureThreshold: 2 });
    const tier = new RedisTier(link, { ttlSeconds: 60, maxEntryBytes: 1024 });
    const changes: string[] = [];
    link.breaker.onChange((to) => changes.push(to));
    for (let i = 0; i < 2; i++) await expect(tier.get('k')).rejects.toThrow();
    expect(link.health()).toEqual({ status: 'down', breaker: 'open' });
    await expect(tier.set('k', entry([1]))).rejects.toThrow(/circuit open/);
    expect(changes).toEqual(['open']);
    expect(tier.counts.errors).toBe(3);
    await tier.close();
  });
});
