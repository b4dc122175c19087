import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, upload } from './fixtures.js';

const key = 'weaving-room-key-0123456789';
let t: TestApp;
beforeAll(async () => {
  t = await build({ config: { signing: { keys: [key] } } });
});
afterAll(() => t.close());

describe('ingest with signing on', () => {
  it('refuses an unsigned or wrongly signed upload before reading it', async () => {
    const bytes = await png(40, 30, rampCode(40));
    const unsigned = await upload(t.app, bytes, '?widths=20');
    expect([unsigned.statusCode, unsigned.json().code]).toEqual([403, 'ERR_SIGNATURE_REQUIRED']);
    const forged = signUrl('/v1/ingest', { widths: '20' }, 'another-key-0123456789abc');
    const wrong = await t.app.inject({ method: 'POST', url: forged, headers: { 'content-type': 'image/png' }, payload: bytes });
    expect([wrong.statusCode, wrong.json().code]).toEqual([403, 'ERR_SIGNATURE_INVALID']);
  });

  it('accepts a signed upload and lists signed rendition URLs that are served as cache hits', async () => {
    const bytes = await png(40, 30, rampCode(40));
    const url = signUrl('/v1/ingest', { widths: '20,40', formats: 'webp' }, key);
    const res = await t.app.inject({ method: 'POST', url, headers: { 'content-type': 'image/png' }, payload: bytes });
    expect(res.statusCode).toBe(200);
    const { renditions } = res.json();
    expect(renditions).toHaveLength(2);
    for (const r of renditions) {
      expect(r.url).toMatch(/[?&]signature=[A-Za-z0-9_-]{43}$/);
      const get = await t.app.inject({ method: 'GET', url: r.url });
      expect(get.statusCode).toBe(200);
      expect(get.headers['server-timing']).toMatch(/cache;desc="hit-/);
      expect(get.headers['cache-control']).toContain('immutable');
    }
  });
});
