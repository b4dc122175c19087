import { readdir, stat, truncate, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DiskTier } from '../../src/cache/disk.js';
import { writeDurably } from '../../src/cache/durable.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

const cacheOf = (res: { headers: Record<string, unknown> }) => /cache;desc="([^"]+)"/.exec(String(res.headers['server-timing']))?.[1];

async function entryFiles(dir: string): Promise<string[]> {
  // The disk tier's entry folders (two hex digits), as DiskTier reads them; not tmp/ or .by-source/.
  const subs = (await readdir(dir)).filter((s) => /^[0-9a-f]{2}$/.test(s));
  return (await Promise.all(subs.map(async (s) => (await readdir(join(dir, s))).map((f) => join(dir, s, f))))).flat();
}

async function counter(t: TestApp, name: 'cacheCorrupt' | 'cacheFull'): Promise<number> {
  return (await t.app.metrics[name].get()).values.reduce((sum, v) => sum + v.value, 0);
}

const url = '/v1/renditions/swatch.png?width=16&format=png';

describe('disk cache entries are checked on every read', () => {
  let t: TestApp;
  beforeAll(async () => {
    // No memory tier: every lookup reads the disk file.
    t = await build({ config: { cache: { memoryBytes: 0 } } });
    await writePng(t.sourceDir, 'swatch.png', 64, 48, 3, (x, y) => [x * 4, y * 5, 128]);
  });
  afterAll(() => t.close());

  it('an entry truncated to half is not served: re-rendered (200 miss, the same bytes), counted in /metrics', async () => {
    const first = await t.app.inject({ url });
    expect(first.statusCode).toBe(200);
    // The answer goes before the disk file is written (renderRendition's answerFirst): wait for it.
    await t.app.renditionCache.cache.settled();
    expect(cacheOf(await t.app.inject({ url }))).toBe('hit-disk');
    const [file] = await entryFiles(t.cacheDir);
    await truncate(file, Math.floor((await stat(file)).size / 2));

    const again = await t.app.inject({ url });
    expect(again.statusCode).toBe(200);
    expect(cacheOf(again)).toBe('miss');
    expect(again.rawPayload.equals(first.rawPayload)).toBe(true);
    expect((await sharp(again.rawPayload).metadata()).width).toBe(16);
    expect(await counter(t, 'cacheCorrupt')).toBe(1);
    const metrics = (await t.app.inject({ url: '/metrics' })).body;
    expect(metrics).toMatch(/^foldwise_cache_corrupt_entries_total\{tier="disk"\} 1$/m);
    // Stored again whole: the next read is a disk hit.
    await t.app.renditionCache.cache.settled();
    expect(cacheOf(await t.app.inject({ url }))).toBe('hit-disk');
  });
});

describe('an unusable or full cache folder degrades readiness and never stops serving', () => {
  it('a cache folder that cannot be created: the app starts, disk tier off, /readyz 200 degraded with the reason', async () => {
    const probe = await build();
    const blocker = join(probe.sourceDir, 'plain-file');
    await writeFile(blocker, 'a file where the cache folder should go');
    const t = await build({ config: { cache: { dir: join(blocker, 'cache') } } });
    try {
      await writePng(t.sourceDir, 'swatch.png', 32, 32, 3, () => [10, 20, 30]);
      const ready = await t.app.inject({ url: '/readyz' });
      expect(ready.statusCode).toBe(200);
      expect(ready.json().status).toBe('degraded');
      expect(ready.json().checks['cache-disk']).toEqual({ ok: false, detail: expect.stringMatching(/^off: .*plain-file\/cache cannot be used \(ENOTDIR\)$/) });
      expect(t.app.renditionCache.cache.tiers.map((tier) => tier.name)).toEqual(['memory']);
      expect((await t.app.inject({ url })).statusCode).toBe(200);
    } finally {
      await t.close();
      await probe.close();
    }
  });

  it('a full disk: the rendition is served, the refusal counted, /readyz 200 degraded until a write fits again', async () => {
    const probe = await build();
    let full = true;
    const disk = await DiskTier.open(join(probe.cacheDir, 'shared'), 1 << 20, {
      write: async (tmp, target, data) =>
        full ? Promise.reject(Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' })) : writeDurably(tmp, target, data),
    });
    const t = await build({ sharedTier: disk });
    try {
      await writePng(t.sourceDir, 'swatch.png', 32, 32, 3, () => [10, 20, 30]);
      expect((await t.app.inject({ url: '/readyz' })).json().status).toBe('ready');
      const res = await t.app.inject({ url });
      expect(res.statusCode).toBe(200);
      expect((await sharp(res.rawPayload).metadata()).width).toBe(16);
      await t.app.renditionCache.cache.settled();
      expect(await counter(t, 'cacheFull')).toBe(1);
      const ready = await t.app.inject({ url: '/readyz' });
      expect(ready.statusCode).toBe(200);
      expect(ready.json()).toMatchObject({ status: 'degraded', checks: { 'cache-disk': { ok: false, detail: expect.stringMatching(/disk full/) } } });
      full = false;
      expect((await t.app.inject({ url: url.replace('width=16', 'width=8') })).statusCode).toBe(200);
      await t.app.renditionCache.cache.settled();
      expect((await t.app.inject({ url: '/readyz' })).json().status).toBe('ready');
    } finally {
      await t.close();
      await probe.close();
    }
  });
});

describe('a miss is answered before its durable store ends (answerFirst)', () => {
  it('answers while the disk write waits, serves the memory copy meanwhile, and close() waits for the write', async () => {
    const probe = await build();
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    let writes = 0;
    const disk = await DiskTier.open(join(probe.cacheDir, 'shared-behind'), 1 << 20, {
      write: async (tmp, target, data) => {
        writes++;
        await held;
        await writeDurably(tmp, target, data);
      },
    });
    const t = await build({ sharedTier: disk });
    let closed = false;
    try {
      await writePng(t.sourceDir, 'swatch.png', 32, 32, 3, () => [10, 20, 30]);
      const res = await t.app.inject({ url });
      expect([res.statusCode, cacheOf(res)]).toEqual([200, 'miss']);
      // The disk file is not there yet; the memory tier answers.
      expect(await entryFiles(join(probe.cacheDir, 'shared-behind'))).toEqual([]);
      expect(cacheOf(await t.app.inject({ url }))).toBe('hit-memory');
      const closing = t.close().then(() => (closed = true));
      await new Promise((r) => setTimeout(r, 50));
      expect(closed).toBe(false);
      release();
      await closing;
      expect(closed).toBe(true);
      expect(await entryFiles(join(probe.cacheDir, 'shared-behind'))).toHaveLength(1);
      expect(writes).toBe(1);
    } finally {
      release();
      if (!closed) await t.close();
      await probe.close();
    }
  });

  it('holds the render\'s flight until the store ends: a second caller meanwhile waits for it and renders nothing', async () => {
    const probe = await build();
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    const disk = await DiskTier.open(join(probe.cacheDir, 'shared-flight'), 1 << 20, {
      write: async (tmp, target, data) => {
        await held;
        await writeDurably(tmp, target, data);
      },
    });
    // No memory tier: a caller that came after the answer finds nothing stored yet.
    const t = await build({ sharedTier: disk, config: { cache: { memoryBytes: 0 } } });
    try {
      await writePng(t.sourceDir, 'swatch.png', 32, 32, 3, () => [10, 20, 30]);
      const origin = t.app.renderContext.origin;
      const read = origin.read.bind(origin);
      let reads = 0;
      origin.read = (...args: Parameters<typeof read>) => ((reads += 1), read(...args));
      const first = await t.app.inject({ url });
      expect([first.statusCode, cacheOf(first), reads]).toEqual([200, 'miss', 1]);
      let secondDone = false;
      const second = t.app.inject({ url }).then((r) => ((secondDone = true), r));
      await new Promise((r) => setTimeout(r, 50));
      expect(secondDone).toBe(false);
      release();
      const again = await second;
      expect(again.statusCode).toBe(200);
      expect(again.rawPayload.equals(first.rawPayload)).toBe(true);
      expect(reads).toBe(1);
    } finally {
      release();
      await t.close();
      await probe.close();
    }
  });
});
