/**
 * An upstream without ETag or Last-Modified, through the app, counting upstream requests: a
 * miss downloads the source once, and hits within the identity TTL ask the upstream nothing
 * (seen before: each of 8 hits made a HEAD and a full GET, each miss two downloads).
 */
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { startUpstream, type Upstream } from './upstream-server.js';

let up: Upstream;
let png: Buffer;

beforeAll(async () => {
  png = await sharp({ create: { width: 40, height: 20, channels: 3, background: { r: 90, g: 60, b: 30 } } }).png().toBuffer();
  up = await startUpstream({
    '/bare-picture.png': (req, res) => {
      res.writeHead(200, { 'content-type': 'image/png', 'content-length': png.length });
      res.end(req.method === 'HEAD' ? undefined : png);
    },
  });
});
afterAll(() => up.close());

const appWith = (identityTtlMs: number) =>
  build({ config: { cache: { identityTtlMs }, origin: { upstream: { allowHosts: [`http://${up.base}`], allowPrivate: true } } } });

const seen = (from: number) => up.requests.slice(from).filter((r) => r.endsWith(' /bare-picture.png'));

describe('upstream without validators, through /v1/renditions', () => {
  let t: TestApp;
  let ttl0: TestApp;
  beforeAll(async () => {
    [t, ttl0] = await Promise.all([appWith(60_000), appWith(0)]);
  });
  afterAll(() => Promise.all([t.close(), ttl0.close()]));

  it('a miss: one HEAD and one GET; then 8 hits: no upstream request', async () => {
    const url = `/v1/renditions/~upstream/${up.base}/bare-picture.png?width=20&format=png`;
    const before = up.requests.length;
    const miss = await t.app.inject({ url });
    expect(miss.statusCode).toBe(200);
    expect(seen(before)).toEqual(['HEAD /bare-picture.png', 'GET /bare-picture.png']);
    for (let i = 0; i < 8; i++) {
      const hit = await t.app.inject({ url });
      expect(hit.statusCode).toBe(200);
      expect(hit.headers.etag).toBe(miss.headers.etag);
    }
    expect(seen(before)).toHaveLength(2);
  });

  it('with the identity memo off, a miss still downloads once', async () => {
    const before = up.requests.length;
    const res = await ttl0.app.inject({ url: `/v1/renditions/~upstream/${up.base}/bare-picture.png?width=10&format=png` });
    expect(res.statusCode).toBe(200);
    expect(seen(before)).toEqual(['HEAD /bare-picture.png', 'GET /bare-picture.png']);
  });
});
