import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

const cacheOf = (res: { headers: Record<string, unknown> }) =>
  /cache;desc="([^"]+)"/.exec(String(res.headers['server-timing']))?.[1];

describe('GET /v1/renditions: HTTP caching, negotiation and the cache tiers', () => {
  let t: TestApp;
  const get = (q: string, headers: Record<string, string> = {}, name = 'flat.png') =>
    t.app.inject({ url: `/v1/renditions/${name}?${q}`, headers });

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'flat.png', 40, 20, 3, (x) => [x * 6, 100, 200]);
    await writePng(t.sourceDir, 'cutout.png', 40, 20, 4, (x) => [200, 50, 50, x < 20 ? 255 : 0]);
    // Smooth ramps at 100 px, where WebP and AVIF beat JPEG and PNG: a negotiated format larger
    // than its fallback answers the fallback (src/rendition/smallest.ts), as 10 px flat.png does.
    await writePng(t.sourceDir, 'ramp.png', 400, 200, 3, (x, y) => [Math.round((255 * x) / 399), Math.round((255 * y) / 199), 128]);
    // The cutout's ramps carry a little hashed noise (a woven texture), which lossless PNG pays for.
    const noise = (x: number, y: number) => (((x * 73856093) ^ (y * 19349663)) >>> 0) % 41 - 20;
    const ramp = (v: number, x: number, y: number) => Math.min(255, Math.max(0, Math.round(v) + noise(x, y)));
    await writePng(t.sourceDir, 'ramp-cutout.png', 400, 200, 4, (x, y) => [ramp((255 * x) / 399, x, y), ramp((255 * y) / 199, y, x), 128, x < 200 ? 255 : 0]);
  });
  afterAll(() => t.close());

  it('a miss then a hit, shown in Server-Timing', async () => {
    const first = await get('width=20&format=png');
    expect(cacheOf(first)).toBe('miss');
    for (const stage of ['origin', 'decode', 'resample', 'encode']) {
      expect(first.headers['server-timing']).toMatch(new RegExp(`${stage};dur=\\d+\\.\\d+`));
    }
    const second = await get('width=20&format=png');
    expect(cacheOf(second)).toBe('hit-memory');
    expect(second.rawPayload.equals(first.rawPayload)).toBe(true);
    expect(second.headers.etag).toBe(first.headers.etag);
    expect(second.headers['rendition-plan']).toBe(first.headers['rendition-plan']);
  });

  it('spellings of one query share a cache entry (canonical query)', async () => {
    await get('width=21&format=png');
    expect(cacheOf(await get('format=png&width=021&density=1&fit=cover&position=center'))).toBe('hit-memory');
    await get('width=21&height=9&format=png');
    expect(cacheOf(await get('height=9&width=21&fit=contain&position=center&format=png'))).toBe('hit-memory');
    await get('width=21&height=9&fit=fill&format=png');
    expect(cacheOf(await get('width=21&height=9&fit=fill&position=left%20top&format=png'))).toBe('hit-memory');
    // Different meanings keep apart: cover is not the default, scale-down caps with one side.
    expect(cacheOf(await get('width=21&height=9&fit=cover&format=png'))).toBe('miss');
    expect(cacheOf(await get('width=21&fit=scale-down&format=png'))).toBe('miss');
  });

  it('strong ETag, long-lived Cache-Control, Content-Length', async () => {
    const res = await get('width=22&format=png');
    expect(res.headers.etag).toMatch(/^"[A-Za-z0-9_-]+"$/); // strong: no W/ (RFC 9110 §8.8.3)
    expect(res.headers['cache-control']).toBe('public, max-age=86400');
    expect(Number(res.headers['content-length'])).toBe(res.rawPayload.length);
  });

  it('If-None-Match gives 304 with validators and no body (RFC 9110 §13.1.2, §15.4.5)', async () => {
    const res = await get('width=23');
    const etag = String(res.headers.etag);
    for (const inm of [etag, `"nope", ${etag}`, `W/${etag}`, '*']) {
      const again = await get('width=23', { 'if-none-match': inm });
      expect(again.statusCode).toBe(304);
      expect(again.rawPayload.length).toBe(0);
      expect(again.headers.etag).toBe(etag);
      expect(again.headers['cache-control']).toBe(res.headers['cache-control']);
      expect(again.headers.vary).toBe('Accept');
    }
    expect((await get('width=23', { 'if-none-match': '"other"' })).statusCode).toBe(200);
  });

  it('HEAD answers the headers of GET without a body', async () => {
    const full = await get('width=24&format=png');
    const head = await t.app.inject({ method: 'HEAD', url: '/v1/renditions/flat.png?width=24&format=png' });
    expect(head.statusCode).toBe(200);
    expect(head.rawPayload.length).toBe(0);
    expect(head.headers.etag).toBe(full.headers.etag);
    expect(head.headers['content-type']).toBe('image/png');
    expect(head.headers['content-length']).toBe(String(full.rawPayload.length));
  });

  it.each([
    ['image/avif,image/webp,*/*', 'ramp.png', 'image/avif'],
    ['image/webp,*/*;q=0.8', 'ramp.png', 'image/webp'],
    ['image/avif;q=0.5,image/webp;q=0.9', 'ramp.png', 'image/webp'],
    ['image/jpeg,*/*;q=0.1', 'ramp.png', 'image/jpeg'],
    ['', 'ramp.png', 'image/jpeg'],
    ['image/png,image/jpeg;q=0.9', 'ramp-cutout.png', 'image/png'],
    ['*/*', 'ramp-cutout.png', 'image/png'],
    ['image/webp,*/*', 'ramp-cutout.png', 'image/webp'],
  ])('no format, Accept "%s" on %s -> %s, Vary: Accept', async (accept, name, type) => {
    const headers: Record<string, string> = accept ? { accept } : {};
    const res = await get('width=100', headers, name);
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe(type);
    expect(res.headers.vary).toBe('Accept');
  });

  it('different Accept classes never share a cached body', async () => {
    const avif = await get('width=101', { accept: 'image/avif,*/*' }, 'ramp.png');
    const jpeg = await get('width=101', { accept: 'image/jpeg' }, 'ramp.png');
    expect(avif.headers['content-type']).toBe('image/avif');
    expect(jpeg.headers['content-type']).toBe('image/jpeg');
    expect(cacheOf(jpeg)).toBe('miss');
  });

  it('a changed source is a new identity: a miss, not the old bytes', async () => {
    await writePng(t.sourceDir, 'changing.png', 30, 30, 3, () => [0, 0, 0]);
    const before = await get('width=10&format=png', {}, 'changing.png');
    await writePng(t.sourceDir, 'changing.png', 32, 32, 3, () => [255, 255, 255]);
    const after = await get('width=10&format=png', {}, 'changing.png');
    expect(cacheOf(after)).toBe('miss');
    expect(after.headers.etag).not.toBe(before.headers.etag);
  });

  it('the disk tier answers a fresh replica (hit-disk), which then holds it in memory', async () => {
    await get('width=25&format=webp');
    await t.app.renditionCache.cache.settled(); // answered before the disk write ended (answerFirst)
    const replica = await build({ sourceDir: t.sourceDir, config: { cache: { dir: t.cacheDir } } });
    try {
      const url = '/v1/renditions/flat.png?width=25&format=webp';
      expect(cacheOf(await replica.app.inject({ url }))).toBe('hit-disk');
      expect(cacheOf(await replica.app.inject({ url }))).toBe('hit-memory');
    } finally {
      await replica.close();
    }
  });
});
