import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { memoryEntries } from './cache-probe.js';

const key = 'selvedge-signing-key-2026';
const oldKey = 'selvedge-signing-key-2025';
const path = '/v1/renditions/stripes.png';


async function withStripes(config: Record<string, unknown>): Promise<TestApp> {
  const t = await build({ config });
  await writePng(t.sourceDir, 'stripes.png', 32, 16, 3, (x) => (x % 2 ? [250, 250, 250] : [20, 20, 20]));
  return t;
}

describe('signed URLs, signing required (keys set)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await withStripes({ signing: { keys: [key, oldKey] } });
  });
  afterAll(() => t.close());

  it('refuses an unsigned URL with 403 ERR_SIGNATURE_REQUIRED, before parsing or caching', async () => {
    for (const url of [`${path}?width=16`, `${path}?width=-5&junk=1`]) {
      const res = await t.app.inject({ url });
      expect(res.statusCode).toBe(403);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(res.json()).toMatchObject({ status: 403, code: 'ERR_SIGNATURE_REQUIRED' });
    }
    // HEAD is the GET route's twin and carries its route config: refused the same way.
    expect((await t.app.inject({ method: 'HEAD', url: `${path}?width=16` })).statusCode).toBe(403);
    expect(memoryEntries(t.app)).toBe(0);
  });

  it('serves a signed URL with Cache-Control public, max-age one year, immutable (RFC 8246)', async () => {
    const res = await t.app.inject({ url: signUrl(path, { width: '16', format: 'png' }, key) });
    expect(res.statusCode).toBe(200);
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    const head = await t.app.inject({ method: 'HEAD', url: signUrl(path, { width: '16', format: 'png' }, key) });
    expect(head.statusCode).toBe(200);
    expect(head.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('keeps immutable on 304 revalidation (RFC 9110 section 15.4.5)', async () => {
    const url = signUrl(path, { width: '16', format: 'png' }, key);
    const first = await t.app.inject({ url });
    const again = await t.app.inject({ url, headers: { 'if-none-match': String(first.headers.etag) } });
    expect(again.statusCode).toBe(304);
    expect(again.headers['cache-control']).toContain('immutable');
  });

  it('refuses tampered parameters and paths with 403 ERR_SIGNATURE_INVALID, nothing cached', async () => {
    const before = memoryEntries(t.app);
    const good = signUrl(path, { width: '16', format: 'png' }, key);
    const tampered = [good.replace('width=16', 'width=17'), good.replace('stripes', 'other'), `${good}&quality=5`];
    for (const url of tampered) {
      const res = await t.app.inject({ url });
      expect(res.statusCode, url).toBe(403);
      expect(res.json()).toMatchObject({ code: 'ERR_SIGNATURE_INVALID' });
      expect(res.headers['cache-control']).toBe('no-store');
    }
    expect(memoryEntries(t.app)).toBe(before);
  });

  it('accepts a URL signed with the older of two keys (rotation)', async () => {
    const res = await t.app.inject({ url: signUrl(path, { width: '12', format: 'png' }, oldKey) });
    expect(res.statusCode).toBe(200);
  });

  it('a signature from an unknown key is invalid', async () => {
    const res = await t.app.inject({ url: signUrl(path, { width: '12' }, 'some-other-key-entirely') });
    expect(res.json()).toMatchObject({ status: 403, code: 'ERR_SIGNATURE_INVALID' });
  });

  it('a percent-encoded spelling of the route is checked like the plain one', async () => {
    const res = await t.app.inject({ url: '/v1/%72enditions/stripes.png?width=16' });
    expect(res.statusCode).not.toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  });

  it('covers the alias-risk endpoint too; a rendition signature does not carry over', async () => {
    const risk = '/v1/alias-risk/stripes.png';
    expect((await t.app.inject({ url: `${risk}?width=16` })).json()).toMatchObject({ status: 403, code: 'ERR_SIGNATURE_REQUIRED' });
    const borrowed = signUrl(path, { width: '16' }, key).replace(path, risk);
    expect((await t.app.inject({ url: borrowed })).json()).toMatchObject({ status: 403, code: 'ERR_SIGNATURE_INVALID' });
    const res = await t.app.inject({ url: signUrl(risk, { width: '16' }, key) });
    expect(res.statusCode, res.body).toBe(200);
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('other endpoints need no signature', async () => {
    expect((await t.app.inject({ url: '/healthz' })).statusCode).toBe(200);
  });
});

describe('signed URLs, signing optional (keys set, required false)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await withStripes({ signing: { keys: [key], required: false } });
  });
  afterAll(() => t.close());

  it('serves unsigned URLs with the ordinary max-age and signed ones immutable', async () => {
    const plain = await t.app.inject({ url: `${path}?width=16&format=png` });
    expect(plain.statusCode).toBe(200);
    expect(plain.headers['cache-control']).toBe('public, max-age=86400');
    const signed = await t.app.inject({ url: signUrl(path, { width: '16', format: 'png' }, key) });
    expect(signed.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('still refuses a signature that is present but wrong', async () => {
    const res = await t.app.inject({ url: `${path}?width=16&signature=${'A'.repeat(43)}` });
    expect(res.json()).toMatchObject({ status: 403, code: 'ERR_SIGNATURE_INVALID' });
  });
});

describe('signing configuration', () => {
  it('refuses to start when signing is required but no key is set', async () => {
    await expect(build({ config: { signing: { keys: [], required: true } } })).rejects.toThrow(/signing/);
  });

  it('with no keys, URLs need no signature', async () => {
    const t = await withStripes({});
    try {
      expect((await t.app.inject({ url: `${path}?width=16` })).statusCode).toBe(200);
    } finally {
      await t.close();
    }
  });
});
