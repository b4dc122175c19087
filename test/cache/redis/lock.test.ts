import { once } from 'node:events';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { Redis } from 'ioredis';
import { RedisLink } from '../../../src/cache/redis/link.js';
import { RedisFlight, type FlightWork } from '../../../src/cache/redis/lock.js';
import { RedisTier } from '../../../src/cache/redis/tier.js';
import type { CacheEntry } from '../../../src/cache/types.js';
import { freePort, redisBinary, startRedis, type RedisProcess } from '../../helpers/redis-server.js';

const made = (tag: string): CacheEntry => ({
  body: Buffer.from(tag), contentType: 'image/png', etag: `"${tag}"`, headers: {}, createdAt: 1,
});

/** One "replica": its own connections, tier and flight. */
function replica(url: string, opts: { lockTtlMs?: number; waitDeadlineMs?: number; pollMs?: number } = {}) {
  const link = new RedisLink({ url, commandTimeoutMs: 500, namespace: 'lock-test:' });
  const tier = new RedisTier(link, { ttlSeconds: 60, maxEntryBytes: 1 << 20 });
  const flight = new RedisFlight(link, { lockTtlMs: 2_000, waitDeadlineMs: 10_000, ...opts });
  let renders = 0;
  const work = (key: string, produce: () => Promise<CacheEntry>): FlightWork => ({
    lookup: () => tier.get(key),
    // As renderRendition's work does: render, then store (its one write path) before resolving.
    produce: async () => { renders += 1; const e = await produce(); await tier.set(key, e).catch(() => undefined); return e; },
  });
  return { link, tier, flight, work, renders: () => renders };
}

function deferred<T>() {
  let resolve!: (v: T) => void;
  const promise = new Promise<T>((r) => (resolve = r));
  return { promise, resolve };
}

describe.skipIf(!redisBinary)('RedisFlight across two replicas', () => {
  let server: RedisProcess;
  let raw: Redis;
  const open: Array<ReturnType<typeof replica>> = [];
  const make = (o?: Parameters<typeof replica>[1]) => { const r = replica(server.url, o); open.push(r); return r; };

  beforeAll(async () => {
    server = await startRedis();
    raw = new Redis(server.url);
  });
  afterEach(async () => { await Promise.all(open.splice(0).map((r) => r.link.close())); });
  afterAll(async () => { raw?.disconnect(); await server?.stop(); });

  it('renders once: the waiter is woken by pub/sub and takes the holder\'s result', async () => {
    // Polling slower than the deadline: only a pub/sub message can wake B in time.
    const a = make(), b = make({ pollMs: 60_000, waitDeadlineMs: 30_000 });
    await Promise.all([a.link.ready(), b.link.ready()]);
    const gate = deferred<void>();
    const leading = once(a.flight, 'leader');
    const pa = a.flight.run('r1', a.work('r1', async () => { await gate.promise; return made('one'); }));
    await leading;
    const waiting = once(b.flight, 'wait');
    const pb = b.flight.run('r1', b.work('r1', async () => made('two')));
    await waiting;
    gate.resolve();
    const [ra, rb] = await Promise.all([pa, pb]);
    expect(ra.role).toBe('leader');
    expect(rb).toEqual({ role: 'follower', entry: made('one') });
    expect(a.renders() + b.renders()).toBe(1);
    expect(await raw.exists('lock-test:lock:r1')).toBe(0); // released
  });

  it('falls back to polling when the holder stores and releases without a message', async () => {
    const b = make({ pollMs: 25 });
    await b.link.ready();
    await raw.set('lock-test:lock:r2', 'someone-else', 'PX', 30_000);
    const waiting = once(b.flight, 'wait');
    const pb = b.flight.run('r2', b.work('r2', async () => made('mine')));
    await waiting;
    const other = make();
    await other.link.ready();
    await other.tier.set('r2', made('theirs'));
    await raw.del('lock-test:lock:r2'); // no PUBLISH
    expect(await pb).toEqual({ role: 'follower', entry: made('theirs') });
    expect(b.renders()).toBe(0);
  });

  it('renders itself when the holder died (lock expired, no result)', async () => {
    const b = make({ pollMs: 25 });
    await b.link.ready();
    await raw.set('lock-test:lock:r3', 'dead-holder', 'PX', 150);
    const result = await b.flight.run('r3', b.work('r3', async () => made('rescued')));
    expect(result.entry).toEqual(made('rescued'));
    expect(result.role).toBe('leader'); // it took the lock the dead holder left
    expect(b.renders()).toBe(1);
  });

  it('takes a result stored between the miss and the lock instead of rendering again', async () => {
    const b = make();
    await b.link.ready();
    await b.tier.set('r7', made('already there'));
    const result = await b.flight.run('r7', b.work('r7', async () => made('again')));
    expect(result).toEqual({ role: 'follower', entry: made('already there') });
    expect(b.renders()).toBe(0);
    expect(await raw.exists('lock-test:lock:r7')).toBe(0);
  });

  it('renders alone once the wait deadline passes', async () => {
    const b = make({ pollMs: 25, waitDeadlineMs: 100 });
    await b.link.ready();
    await raw.set('lock-test:lock:r4', 'slow-holder', 'PX', 30_000);
    const result = await b.flight.run('r4', b.work('r4', async () => made('impatient')));
    expect(result.role).toBe('solo');
    expect(b.renders()).toBe(1);
  });

  it('only the owner releases: a foreign token leaves the lock alone', async () => {
    const a = make();
    await a.link.ready();
    const gate = deferred<void>();
    const leading = once(a.flight, 'leader');
    const pa = a.flight.run('r5', a.work('r5', async () => { await gate.promise; return made('x'); }));
    await leading;
    const token = await raw.get('lock-test:lock:r5');
    expect(token).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/); // randomUUID
    await raw.set('lock-test:lock:r5', 'intruder', 'PX', 30_000); // lock lost and re-taken
    gate.resolve();
    await pa;
    expect(await raw.get('lock-test:lock:r5')).toBe('intruder');
  });

  it('a failed render wakes the waiter, which then renders itself', async () => {
    const a = make(), b = make({ pollMs: 60_000 });
    await Promise.all([a.link.ready(), b.link.ready()]);
    const gate = deferred<void>();
    const leading = once(a.flight, 'leader');
    const pa = a.flight.run('r6', a.work('r6', async () => { await gate.promise; throw new Error('decode failed'); }));
    await leading;
    const waiting = once(b.flight, 'wait');
    const pb = b.flight.run('r6', b.work('r6', async () => made('second try')));
    await waiting;
    gate.resolve();
    await expect(pa).rejects.toThrow('decode failed');
    expect((await pb).entry).toEqual(made('second try'));
  });
});

describe('RedisFlight with no Redis', () => {
  it('renders alone', async () => {
    const port = await freePort();
    const r = replica(`redis://127.0.0.1:${port}`);
    const result = await r.flight.run('k', r.work('k', async () => made('alone')));
    expect(result).toEqual({ role: 'solo', entry: made('alone') });
    await r.link.close();
  });
});
