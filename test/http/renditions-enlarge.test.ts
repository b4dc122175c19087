import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { pixels, quadrantColour, writePng } from '../helpers/images.js';

// The enlargement policy (README "Enlargement"): by default a rendition never has more pixels
// per source pixel than limits.enlargement.default (1); enlarge=allowed raises the cap to
// limits.enlargement.allowed (4). Past the cap the box shrinks, keeping its shape, and the
// answer says so in Rendition-Clamped (a structured-field dictionary, RFC 8941 §3.2).
describe('GET /v1/renditions: enlargement cap', () => {
  let t: TestApp;
  const get = (q: string) => t.app.inject({ url: `/v1/renditions/quad.png?format=png&${q}` });
  const size = async (q: string) => {
    const res = await get(q);
    expect(res.statusCode, res.body).toBe(200);
    const img = await pixels(res.rawPayload);
    return { size: [img.width, img.height], clamped: res.headers['rendition-clamped'] };
  };

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'quad.png', 200, 100, 3, quadrantColour(200, 100));
  });
  afterAll(() => t.close());

  it('a request wider than the source gets the source size and a header naming what it asked', async () => {
    expect(await size('width=4000')).toEqual({ size: [200, 100], clamped: 'asked-width=4000, asked-height=2000, limit=1.0' });
    // density multiplies first: 150 CSS px at density 2 is 300 px of a 200 px source.
    expect(await size('width=150&density=2')).toEqual({ size: [200, 100], clamped: 'asked-width=300, asked-height=150, limit=1.0' });
    expect(await size('width=200')).toEqual({ size: [200, 100], clamped: undefined });
  });

  it('cover keeps the box shape (so CSS scales it up without distortion)', async () => {
    expect(await size('width=400&height=400&fit=cover')).toEqual({
      size: [100, 100],
      clamped: 'asked-width=400, asked-height=400, limit=1.0',
    });
  });

  it('enlarge=allowed enlarges up to limits.enlargement.allowed, then clamps', async () => {
    expect(await size('width=400&enlarge=allowed')).toEqual({ size: [400, 200], clamped: undefined });
    expect(await size('width=1000&enlarge=allowed')).toEqual({ size: [800, 400], clamped: 'asked-width=1000, asked-height=500, limit=4.0' });
  });

  it('the alias-risk report plans the same clamped size', async () => {
    const res = await t.app.inject({ url: '/v1/alias-risk/quad.png?width=4000' });
    expect(res.statusCode, res.body).toBe(200);
    expect(res.json().target).toMatchObject({ width: 200, height: 100 });
  });

  it('enlarge takes only its two words', async () => {
    const res = await get('width=100&enlarge=yes');
    expect(res.statusCode).toBe(400);
    expect(res.json().detail).toContain('enlarge must be limited or allowed');
  });

  it('the default cap is configurable', async () => {
    const loose = await build({ sourceDir: t.sourceDir, config: { limits: { enlargement: { default: 2, allowed: 2 } } } });
    try {
      const res = await loose.app.inject({ url: '/v1/renditions/quad.png?format=png&width=300' });
      expect((await pixels(res.rawPayload)).width).toBe(300);
      const past = await loose.app.inject({ url: '/v1/renditions/quad.png?format=png&width=500' });
      expect(past.headers['rendition-clamped']).toBe('asked-width=500, asked-height=250, limit=2.0');
    } finally {
      await loose.close();
    }
  });
});
