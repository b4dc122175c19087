import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readdir, writeFile } from 'node:fs/promises';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, upload } from './fixtures.js';

const key = 'weaving-room-key-0123456789';
// SHA-256 from node:crypto (FIPS 180-4), independent of the service's own digest helper.
const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
const post = (url: string, payload: Buffer | object, headers: Record<string, string> = {}) =>
  t.app.inject({
    method: 'POST',
    url,
    headers: { 'content-type': Buffer.isBuffer(payload) ? 'image/png' : 'application/json', ...headers },
    payload: Buffer.isBuffer(payload) ? payload : JSON.stringify(payload),
  });
const stored = async () => (await readdir(t.sourceDir, { recursive: true })).filter((f) => f.startsWith('uploads/')).sort();
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
    const url = signUrl('/v1/ingest', { widths: '20,40', formats: 'webp', digest: sha256(bytes) }, key);
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

describe('a signed ingest URL binds its body', () => {
  it('refuses a signed URL that names neither digest nor source, before reading the body', async () => {
    const res = await post(signUrl('/v1/ingest', { widths: '20' }, key), await png(24, 16, rampCode(24)));
    expect([res.statusCode, res.json().code]).toEqual([403, 'ERR_INGEST_UNBOUND']);
  });

  it('refuses an upload whose SHA-256 differs from the signed digest, sync or async, and stores nothing', async () => {
    const signedFor = await png(30, 20, rampCode(30));
    const other = await png(30, 20, (x) => [x * 8, 0, 0]);
    const url = signUrl('/v1/ingest', { widths: '20', digest: sha256(signedFor) }, key);
    const before = await stored();
    for (const headers of [{}, { prefer: 'respond-async' }] as Array<Record<string, string>>) {
      const res = await post(url, other, headers);
      expect([res.statusCode, res.json().code]).toEqual([403, 'ERR_INGEST_DIGEST_MISMATCH']);
    }
    expect(await stored()).toEqual(before);
    // The same URL with the bytes it names is accepted; changing the digest breaks the signature.
    expect((await post(url, signedFor)).statusCode).toBe(200);
    const tampered = url.replace(/digest=[0-9a-f]{64}/, `digest=${sha256(other)}`);
    expect((await post(tampered, other)).json().code).toBe('ERR_SIGNATURE_INVALID');
  });

  it('binds a named source: only the signed one is ingested, and a digest URL cannot name one', async () => {
    await writeFile(`${t.sourceDir}/bound.png`, await png(32, 16, rampCode(32)));
    await writeFile(`${t.sourceDir}/other.png`, await png(32, 16, rampCode(32)));
    const url = signUrl('/v1/ingest', { widths: '16', source: 'bound.png' }, key);
    const wrong = await post(url, { source: 'other.png' });
    expect([wrong.statusCode, wrong.json().code]).toEqual([403, 'ERR_INGEST_SOURCE_MISMATCH']);
    const right = await post(url, { source: 'bound.png' });
    expect(right.statusCode).toBe(200);
    expect(right.json().source.key).toBe('bound.png');
    const byDigest = signUrl('/v1/ingest', { widths: '16', digest: 'ab'.repeat(32) }, key);
    expect((await post(byDigest, { source: 'bound.png' })).json().code).toBe('ERR_INGEST_DIGEST_MISMATCH');
    const sourceUrlUpload = await post(url, await png(32, 16, rampCode(32)));
    expect(sourceUrlUpload.json().code).toBe('ERR_INGEST_SOURCE_MISMATCH');
  });
});
