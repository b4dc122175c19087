import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { HttpOriginOptions } from '../../src/origins/http.js';
import { parseAllowHosts } from '../../src/origins/http-allowlist.js';
import { codeOf, originFor, payload, payloadSha256, startUpstream, type Upstream } from './upstream-server.js';

let up: Upstream;
beforeAll(async () => {
  up = await startUpstream();
});
afterAll(() => up.close());

const timeouts = { connectMs: 2000, headersMs: 2000, bodyMs: 2000 };

const origin = (over: Partial<HttpOriginOptions> = {}) => originFor([up], { timeouts, ...over });

describe('http origin: reading', () => {
  it('reads an allowlisted source; the ETag is the version', async () => {
    const src = await origin().read(`${up.base}/ok.png`);
    expect(src.bytes.equals(payload)).toBe(true);
    expect(src.identity).toEqual({ key: `http://${up.base}/ok.png`, version: 'etag:"weave-1"' });
    expect(src.contentType).toBe('image/png');
  });

  it('falls back to Last-Modified, then to a SHA-256 of the bytes (FIPS 180-4)', async () => {
    expect((await origin().read(`${up.base}/modified.png`)).identity.version).toBe('modified:Tue, 01 Dec 2026 10:00:00 GMT');
    expect((await origin().read(`${up.base}/plain.png`)).identity.version).toBe(`sha256:${payloadSha256}`);
  });

  it('identify uses HEAD for validators, and the bytes when HEAD is refused', async () => {
    const before = up.requests.length;
    expect((await origin().identify(`${up.base}/ok.png`)).version).toBe('etag:"weave-1"');
    expect(up.requests.slice(before)).toEqual(['HEAD /ok.png']);
    expect((await origin().identify(`${up.base}/plain.png`)).version).toBe(`sha256:${payloadSha256}`);
    expect(await codeOf(origin().identify(`${up.base}/missing.png`))).toBe('ERR_SOURCE_NOT_FOUND');
  });

  it('maps 404 to not-found and 500 to upstream failure', async () => {
    expect(await codeOf(origin().read(`${up.base}/missing.png`))).toBe('ERR_SOURCE_NOT_FOUND');
    expect(await codeOf(origin().read(`${up.base}/broken.png`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('percent-encodes path segments and refuses dot segments and control characters', async () => {
    expect(await codeOf(origin().read(`${up.base}/../ok.png`))).toBe('ERR_SOURCE_PATH_INVALID');
    expect(await codeOf(origin().read(`${up.base}/a/./ok.png`))).toBe('ERR_SOURCE_PATH_INVALID');
    expect(await codeOf(origin().read(`${up.base}/ok.png\r\nX-Injected: 1`))).toBe('ERR_SOURCE_PATH_INVALID');
    expect(await codeOf(origin().read(`${up.base}/a\\ok.png`))).toBe('ERR_SOURCE_PATH_INVALID');
    expect(await codeOf(origin().read(`${up.base}`))).toBe('ERR_SOURCE_PATH_INVALID');
    const before = up.requests.length;
    await codeOf(origin().read(`${up.base}/ok.png?x=1`));
    expect(up.requests.slice(before)).toEqual(['GET /ok.png%3Fx%3D1']);
  });
});

describe('http origin: allowlist and address checks', () => {
  it('refuses hosts that are not on the allowlist, before any connection', async () => {
    const before = up.requests.length;
    expect(await codeOf(origin().read(`127.0.0.1:${up.port + 1}/ok.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
    expect(await codeOf(origin().read(`localhost:${up.port}/ok.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
    expect(up.requests.length).toBe(before);
  });

  it('refuses loopback unless private addresses are explicitly allowed', async () => {
    expect(await codeOf(origin({ allowPrivate: false }).read(`${up.base}/ok.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
    const listed = origin({ allowPrivate: false, allowAddresses: ['127.0.0.1/32'] });
    expect((await listed.read(`${up.base}/ok.png`)).bytes.length).toBe(payload.length);
  });

  it('checks every resolved address: one private address among public ones is refused', async () => {
    const mixed = origin({
      allowPrivate: false,
      allowHosts: [`http://pictures.test:${up.port}`],
      resolve: async () => [{ address: '93.184.216.34', family: 4 }, { address: '10.0.0.7', family: 4 }],
    });
    expect(await codeOf(mixed.read(`pictures.test:${up.port}/ok.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
  });

  it('pins the checked address: one lookup per hop, Host header kept, rebinding has no effect', async () => {
    const answers = ['127.0.0.1', '10.0.0.9'];
    let lookups = 0;
    const pinned = origin({
      allowHosts: [`http://pictures.test:${up.port}`],
      allowPrivate: false,
      allowAddresses: ['127.0.0.1/32'],
      // A rebinding resolver: the first answer passes the guard, later ones would not.
      resolve: async () => [{ address: answers[Math.min(lookups++, 1)], family: 4 }],
    });
    const src = await pinned.read(`pictures.test:${up.port}/ok.png`);
    expect(src.bytes.equals(payload)).toBe(true);
    expect(lookups).toBe(1);
    expect(up.hosts.at(-1)).toBe(`pictures.test:${up.port}`);
    // The next request resolves again, gets the internal address, and is refused.
    expect(await codeOf(pinned.read(`pictures.test:${up.port}/ok.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
  });

  it('a resolver that never answers is a connect timeout', async () => {
    const stalled = origin({
      allowHosts: [`http://pictures.test:${up.port}`],
      timeouts: { ...timeouts, connectMs: 100 },
      resolve: () => new Promise(() => undefined),
    });
    expect(await codeOf(stalled.read(`pictures.test:${up.port}/ok.png`))).toBe('ERR_UPSTREAM_TIMEOUT');
  });

  it('a connection refused is an upstream failure', async () => {
    const closed = await startUpstream();
    await closed.close();
    const o = origin({ allowHosts: [`http://${closed.base}`] });
    expect(await codeOf(o.read(`${closed.base}/ok.png`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('allowlist entries must be bare origins', () => {
    expect(parseAllowHosts(['cdn.example.org', 'http://127.0.0.1:8123'])).toEqual([
      { origin: 'https://cdn.example.org', authority: 'cdn.example.org' },
      { origin: 'http://127.0.0.1:8123', authority: '127.0.0.1:8123' },
    ]);
    for (const bad of ['https://cdn.example.org/images', 'ftp://cdn.example.org', 'https://u:p@cdn.example.org', '*.example.org']) {
      expect(() => parseAllowHosts([bad]), bad).toThrow(RangeError);
    }
  });
});
