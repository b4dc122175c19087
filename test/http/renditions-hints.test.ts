import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hintSteps, snapHinted } from '../../src/http/routes/hints.js';
import { build, type TestApp } from '../helpers/build.js';
import { pixels, quadrantColour, writePng } from '../helpers/images.js';

// Client Hints (RFC 8942: Accept-CH; Sec-CH-Width and Sec-CH-DPR per the Responsive Image
// Client Hints draft, from memory). Caching: a response chosen by request headers must list
// them in Vary (RFC 9110 §12.5.5), including when they were absent, or a shared cache hands
// one client's width to another. The widths below are worked out by hand from the README's
// rule: Sec-CH-Width, else slot x Sec-CH-DPR, else slot x density; header widths rounded up to
// the ladder 32, 36, 40, ... (each 10 % more, rounded up), whose steps near here are
// 245, 270, 297, 327, 360, 397, 437, 481, 530, 583, 642, 707.
describe('GET /v1/renditions?width=hinted', () => {
  let t: TestApp;
  const url = '/v1/renditions/quad.png?format=png&width=hinted&slot=300';
  const get = (headers: Record<string, string> = {}, u = url) => t.app.inject({ url: u, headers });
  const widthOf = async (res: { statusCode: number; body: string; rawPayload: Buffer }) => {
    expect(res.statusCode, res.body).toBe(200);
    return (await pixels(res.rawPayload)).width;
  };

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'quad.png', 1000, 500, 3, quadrantColour(1000, 500));
  });
  afterAll(() => t.close());

  it('takes Sec-CH-Width (device px), rounded up to the ladder', async () => {
    const res = await get({ 'sec-ch-width': '600', 'sec-ch-dpr': '3' });
    expect(await widthOf(res)).toBe(642);
    expect(res.headers['rendition-width']).toBe('642;from=sec-ch-width');
    expect(res.headers.vary).toBe('Sec-CH-Width, Sec-CH-DPR');
  });

  it('else slot x Sec-CH-DPR', async () => {
    const res = await get({ 'sec-ch-dpr': '1.5' });
    expect(await widthOf(res)).toBe(481); // 300 x 1.5 = 450 -> 481
    expect(res.headers['rendition-width']).toBe('481;from=sec-ch-dpr');
  });

  it('without hints (Safari, Firefox): slot x density exactly, still with Vary', async () => {
    const res = await get();
    expect(await widthOf(res)).toBe(300);
    expect(res.headers['rendition-width']).toBe('300;from=fallback');
    expect(res.headers.vary).toBe('Sec-CH-Width, Sec-CH-DPR');
    expect(await widthOf(await get({}, `${url}&density=2`))).toBe(600);
  });

  it('never answers one ratio with the width cached for another', async () => {
    const one = await get({ 'sec-ch-dpr': '1' });
    const two = await get({ 'sec-ch-dpr': '2' });
    const again = await get({ 'sec-ch-dpr': '1' });
    expect([await widthOf(one), await widthOf(two), await widthOf(again)]).toEqual([327, 642, 327]);
    expect(again.headers['server-timing']).toMatch(/cache;desc="hit-/);
    expect(two.headers.etag).not.toBe(one.headers.etag);
    // A ratio-1 client revalidating with the ratio-2 ETag gets the full ratio-1 answer, not 304.
    const cross = await get({ 'sec-ch-dpr': '1', 'if-none-match': String(two.headers.etag) });
    expect(cross.statusCode).toBe(200);
    const same = await get({ 'sec-ch-dpr': '1', 'if-none-match': String(one.headers.etag) });
    expect([same.statusCode, same.headers.vary]).toEqual([304, 'Sec-CH-Width, Sec-CH-DPR']);
  });

  it('shares the cache entry with the same explicit width (same bytes, same ETag)', async () => {
    const hinted = await get({ 'sec-ch-width': '642' });
    const plain = await get({}, '/v1/renditions/quad.png?format=png&width=642');
    expect(plain.headers.etag).toBe(hinted.headers.etag);
    expect(plain.headers.vary).toBeUndefined();
  });

  it('ignores malformed hints, caps huge ones at the source (enlargement cap)', async () => {
    expect(await widthOf(await get({ 'sec-ch-width': 'wide', 'sec-ch-dpr': '-2' }))).toBe(300);
    const huge = await get({ 'sec-ch-width': '99999' });
    expect(await widthOf(huge)).toBe(1000);
    expect(huge.headers['rendition-clamped']).toBe('asked-width=8192, asked-height=4096, limit=1.0');
  });

  it('bounds the variants: every Sec-CH-Width from 1 to 8192 gives one of 58 widths', () => {
    const widths = new Set<number>();
    for (let w = 1; w <= 8192; w++) {
      const s = snapHinted(w, 8192);
      expect(s).toBeGreaterThanOrEqual(Math.min(w, 8192));
      // Never more than 10 % (plus the rounding pixel) above what was asked, past the first step.
      if (w >= 32) expect(s).toBeLessThanOrEqual(Math.ceil(w * 1.1));
      widths.add(s);
    }
    expect(widths.size).toBe(58);
    expect(hintSteps.slice(0, 5)).toEqual([32, 36, 40, 44, 49]);
  });

  it('refuses what it cannot honour, with codes', async () => {
    const missing = await get({}, '/v1/renditions/quad.png?width=hinted');
    expect([missing.statusCode, missing.json().code]).toEqual([400, 'ERR_PARAM_MISSING']);
    const withHeight = await get({}, `${url}&height=100`);
    expect([withHeight.statusCode, withHeight.json().code]).toEqual([400, 'ERR_PARAM_INVALID']);
    const slotAlone = await get({}, '/v1/renditions/quad.png?width=300&slot=300');
    expect([slotAlone.statusCode, slotAlone.json().code]).toEqual([400, 'ERR_PARAM_UNKNOWN']);
  });

  it('advertises the hints it reads in Accept-CH, on renditions and on HTML pages', async () => {
    expect((await get()).headers['accept-ch']).toBe('Sec-CH-DPR, Sec-CH-Width');
    const page = await t.app.inject({ url: '/inspect' });
    expect(page.headers['content-type']).toMatch(/^text\/html/);
    expect(page.headers['accept-ch']).toBe('Sec-CH-DPR, Sec-CH-Width');
  });
});
