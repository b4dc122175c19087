/**
 * Upstream fault injection against a real server on 127.0.0.1: each misbehaviour must end in
 * a stable error code within the configured deadlines, and never hand back more bytes than
 * the limit or the declared length. No assertion here depends on how long anything took.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { HttpOriginOptions } from '../../src/origins/http.js';
import { codeOf, originFor, payload, startUpstream, type Upstream } from './upstream-server.js';

let up: Upstream;
let other: Upstream;
beforeAll(async () => {
  up = await startUpstream();
  other = await startUpstream();
});
afterAll(async () => {
  await up.close();
  await other.close();
});

/** Both upstreams allowed; the two deadline tests below pass their own short `deadlines`. */
const origin = (over: Partial<HttpOriginOptions> = {}) => originFor([up, other], over);

/** Short deadlines for the tests that wait for one to pass (the upstream never finishes in time). */
const deadlines = { timeouts: { connectMs: 5000, headersMs: 300, bodyMs: 300 } };

describe('http origin: faults', () => {
  it('an upstream that never answers hits the header deadline', async () => {
    expect(await codeOf(origin(deadlines).read(`${up.base}/hang.png`))).toBe('ERR_UPSTREAM_TIMEOUT');
  });

  it('a connection reset mid-body is an upstream failure', async () => {
    expect(await codeOf(origin().read(`${up.base}/reset.png`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('bytes beyond the declared Content-Length make the answer malformed (RFC 9112 section 6.3)', async () => {
    // The message ends at Content-Length; trailing bytes are not a response, so the whole
    // answer is refused rather than trusting either length.
    expect(await codeOf(origin().read(`${up.base}/overdeclared.png`))).toBe('ERR_UPSTREAM_FAILED');
    expect(await codeOf(origin().read(`${up.base}/overdeclared-keepalive.png`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('a Content-Length above the limit is refused before the body is read', async () => {
    expect(await codeOf(origin().read(`${up.base}/declared-large.png`))).toBe('ERR_SOURCE_TOO_LARGE');
  });

  it('an undeclared (chunked) body is cut off once it passes the limit', async () => {
    expect(await codeOf(origin().read(`${up.base}/chunked-large.png`))).toBe('ERR_SOURCE_TOO_LARGE');
    // The same body fits a larger limit: the limit, not the chunking, decided.
    const roomy = origin({ maxBytes: 2_000_000, timeouts: { connectMs: 2000, headersMs: 2000, bodyMs: 5000 } });
    expect((await roomy.read(`${up.base}/chunked-large.png`)).bytes.length).toBe(1_000_000);
  });

  it('a slow dribble hits the body deadline', async () => {
    expect(await codeOf(origin(deadlines).read(`${up.base}/dribble.png`))).toBe('ERR_UPSTREAM_TIMEOUT');
  });

  it('the caller can abort a fetch, which closes the upstream connection', async () => {
    const controller = new AbortController();
    const pending = origin({ timeouts: { connectMs: 1000, headersMs: 10_000, bodyMs: 10_000 } }).read(
      `${up.base}/hang.png`,
      controller.signal,
    );
    const seen = up.requests.length;
    // Abort once the upstream has the request (event-driven: poll the request log per tick).
    while (up.requests.length === seen) await new Promise((r) => setImmediate(r));
    controller.abort(new Error('client went away'));
    await expect(pending).rejects.toThrow('client went away');
  });
});

describe('http origin: redirects (RFC 9110 section 15.4)', () => {
  it('follows a chain of 301/308 within the limit', async () => {
    const src = await origin().read(`${up.base}/chain/3`);
    expect(src.bytes.equals(payload)).toBe(true);
    expect(src.identity.key).toBe(`http://${up.base}/chain/3`);
  });

  it('one redirect more than allowed is a failure', async () => {
    expect(await codeOf(origin({ maxRedirects: 2 }).read(`${up.base}/chain/3`))).toBe('ERR_UPSTREAM_FAILED');
    expect(await codeOf(origin({ maxRedirects: 0 }).read(`${up.base}/chain/1`))).toBe('ERR_UPSTREAM_FAILED');
  });

  it('a redirect loop ends at the limit', async () => {
    const before = up.requests.length;
    expect(await codeOf(origin().read(`${up.base}/to-loop.png`))).toBe('ERR_UPSTREAM_FAILED');
    expect(up.requests.length - before).toBe(4);
  });

  it('a redirect to the metadata address is refused, even if that host were allowlisted', async () => {
    expect(await codeOf(origin().read(`${up.base}/to-metadata.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
    const listed = origin({ allowHosts: [`http://${up.base}`, 'http://169.254.169.254'] });
    expect(await codeOf(listed.read(`${up.base}/to-metadata.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
  });

  it('a redirect to a host off the allowlist is refused; one to another listed host is followed', async () => {
    const hop = { '/hop.png': (_q: unknown, res: import('node:http').ServerResponse) => void res.writeHead(302, { location: `http://${other.base}/ok.png` }).end() };
    const hopping = await startUpstream(hop);
    try {
      const onlyFirst = origin({ allowHosts: [`http://${hopping.base}`] });
      expect(await codeOf(onlyFirst.read(`${hopping.base}/hop.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
      const both = origin({ allowHosts: [`http://${hopping.base}`, `http://${other.base}`] });
      expect((await both.read(`${hopping.base}/hop.png`)).bytes.equals(payload)).toBe(true);
    } finally {
      await hopping.close();
    }
  });

  it('each hop is checked again: a listed host that resolves privately is refused mid-chain', async () => {
    const hop = { '/hop.png': (_q: unknown, res: import('node:http').ServerResponse) => void res.writeHead(302, { location: `http://inner.test:${other.port}/ok.png` }).end() };
    const hopping = await startUpstream(hop);
    try {
      const o = origin({
        allowPrivate: false,
        allowAddresses: ['127.0.0.1/32'],
        allowHosts: [`http://${hopping.base}`, `http://inner.test:${other.port}`],
        resolve: async () => [{ address: '192.168.10.10', family: 4 }],
      });
      expect(await codeOf(o.read(`${hopping.base}/hop.png`))).toBe('ERR_UPSTREAM_FORBIDDEN');
    } finally {
      await hopping.close();
    }
  });

  it('a redirect without a Location is an upstream failure', async () => {
    expect(await codeOf(origin().read(`${up.base}/to-nowhere.png`))).toBe('ERR_UPSTREAM_FAILED');
  });
});
