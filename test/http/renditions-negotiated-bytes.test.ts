import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoImages, ensureDemoImages } from '../../tools/demo/index.js';
import { demoExtras } from '../../tools/demo/extras.js';
import { build, type TestApp } from '../helpers/build.js';

// A negotiated format never answers more bytes than the fallback (JPEG, PNG with alpha, GIF
// for animations) at the service's settings, on the demo shop's pictures.

const accepts = ['image/avif,image/webp,*/*', 'image/webp,*/*'];
const cases = [
  ...demoImages.flatMap((d) => [640, ...(d.path === 'fabrics/herringbone.jpg' ? [1280] : [])].map((w) => [d.path, w] as const)),
  ...demoExtras.map((d) => [d.path, 320] as const),
];

describe('negotiated formats never cost bytes', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build({ config: { pool: { threads: 2 } } });
    await ensureDemoImages(t.sourceDir);
  }, 120_000);
  afterAll(() => t.close());

  it.each(cases)('%s at %i px: each Accept gets at most the fallback bytes, with Vary: Accept', async (path, width) => {
    const fallback = await t.app.inject({ url: `/v1/renditions/${path}?width=${width}` });
    expect(fallback.statusCode).toBe(200);
    const plainType = String(fallback.headers['content-type']);
    expect(['image/jpeg', 'image/png', 'image/gif']).toContain(plainType);
    for (const accept of accepts) {
      const res = await t.app.inject({ url: `/v1/renditions/${path}?width=${width}`, headers: { accept } });
      expect(res.statusCode).toBe(200);
      expect(res.headers.vary).toContain('Accept');
      expect(res.rawPayload.length, `${accept}: ${res.headers['content-type']}`).toBeLessThanOrEqual(fallback.rawPayload.length);
      // The fallback itself, when it won, is the very bytes a client without WebP gets.
      if (res.headers['content-type'] === plainType) expect(res.headers.etag).toBe(fallback.headers.etag);
    }
  });
});

describe('the bytes rule weighs only WebP and AVIF', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
    await ensureDemoImages(t.sourceDir);
  }, 120_000);
  afterAll(() => t.close());

  it('a client that accepts only PNG gets PNG, even where a JPEG would be smaller', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/fabrics/twill.jpg?width=200', headers: { accept: 'image/png' } });
    expect(res.headers['content-type']).toBe('image/png');
  });
});
