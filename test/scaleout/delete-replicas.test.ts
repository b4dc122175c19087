/**
 * Deleting a source with two replicas sharing Redis: the deleting replica removes the shared
 * entries and the other forgets its memory copies on the purge message before the answer.
 */
import { access, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Redis } from 'ioredis';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { next, redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';

const key = 'a signing key for the weaving shop';
const stripes = (x: number) => (x % 3 ? [30, 60, 120] : [250, 250, 240]);
let server: RedisProcess;
let dir: string;
let a: TestApp;
let b: TestApp;
let redis: Redis;

beforeAll(async () => {
  if (!redisBinary) return;
  server = await startRedis();
  redis = new Redis(server.url);
  dir = await mkdtemp(join(tmpdir(), 'fw-delete-'));
  await writePng(dir, 'twill.png', 90, 60, 3, stripes);
  const config = { cache: { redisUrl: server.url }, redis: { namespace: 'del:' }, signing: { keys: [key], required: false } };
  [a, b] = [await build({ sourceDir: dir, config }), await build({ sourceDir: dir, config })];
  await Promise.all([a.app.sharedRedis!.tier.link.ready(), b.app.sharedRedis!.tier.link.ready()]);
  await Promise.all([a.app.purgeBus!.whenSubscribed(), b.app.purgeBus!.whenSubscribed()]);
});
afterAll(async () => {
  await Promise.all([a?.close(), b?.close()]);
  redis?.disconnect();
  await server?.stop();
  if (dir) await rm(dir, { recursive: true, force: true });
});

it.skipIf(!redisBinary)('removes the shared entries and the other replica\'s memory copies; 404 from both after', async () => {
  const urls = ['/v1/renditions/twill.png?width=45&format=png', '/v1/renditions/twill.png?width=30&format=jpeg'];
  for (const u of urls) expect((await a.app.inject(u)).statusCode).toBe(200);
  // B finds them in Redis and keeps a copy in its memory (L1).
  for (const u of urls) expect((await b.app.inject(u)).statusCode).toBe(200);
  const memoryOfB = b.app.renditionCache.cache.tiers[0] as unknown as { name: string; entries: number };
  expect(memoryOfB.name).toBe('memory');
  expect(memoryOfB.entries).toBe(2);
  expect((await a.app.inject('/v1/alias-risk/twill.png?width=30')).statusCode).toBe(200);
  const before = await redis.keys('del:c:*');
  expect(before.length).toBeGreaterThanOrEqual(2);
  const res = await a.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/twill.png', {}, key) });
  expect(res.statusCode).toBe(200);
  expect(res.json()).toMatchObject({ source: 'twill.png', removed: true, replicas: 1, confirmed: 1 });
  expect(await redis.keys('del:c:*')).toEqual([]);
  expect(await redis.keys('del:src:*')).toEqual([]);
  expect(memoryOfB.entries).toBe(0);
  for (const app of [a.app, b.app]) {
    for (const u of urls) expect((await app.inject(u)).statusCode).toBe(404);
  }
});

it.skipIf(!redisBinary)('while Redis is down a deletion is refused (503, Retry-After) before anything is deleted; sent again later it deletes everywhere', async () => {
  await writePng(dir, 'herringbone.png', 80, 60, 3, (x, y) => ((x + y) % 4 < 2 ? [120, 80, 40] : [230, 220, 200]));
  const url = '/v1/renditions/herringbone.png?width=40&format=png';
  for (const app of [a.app, b.app]) expect((await app.inject(url)).statusCode).toBe(200);
  const down = [a, b].map((t) => next(t.app.sharedRedis!.tier.link.client, 'close'));
  await server.kill();
  await Promise.all(down);
  const refused = await a.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/herringbone.png', {}, key) });
  expect(refused.statusCode).toBe(503);
  expect(refused.json()).toMatchObject({ code: 'ERR_PURGE_DOWN', status: 503 });
  expect(refused.headers['retry-after']).toBe('2');
  await access(join(dir, 'herringbone.png')); // still there: nothing was deleted
  for (const app of [a.app, b.app]) expect((await app.inject(url)).statusCode).toBe(200);

  // Redis comes back (empty): both replicas reconnect and subscribe again.
  const up = [a, b].map((t) => next(t.app.sharedRedis!.tier.link.client, 'ready'));
  await server.restart();
  await Promise.all(up);
  await Promise.all([a.app.purgeBus!.whenSubscribed(), b.app.purgeBus!.whenSubscribed()]);
  const res = await a.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/herringbone.png', {}, key) });
  expect(res.statusCode).toBe(200);
  expect(res.json()).toMatchObject({ source: 'herringbone.png', removed: true, replicas: 1, confirmed: 1 });
  await expect(access(join(dir, 'herringbone.png'))).rejects.toThrow(/ENOENT/);
  for (const app of [a.app, b.app]) expect((await app.inject(url)).statusCode).toBe(404);
});
