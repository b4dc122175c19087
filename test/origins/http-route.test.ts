/**
 * The upstream origin through the app: /v1/renditions/~upstream/<host>:<port>/<path> against
 * a real server on 127.0.0.1. Failures are problem+json with their codes and are not cached;
 * a new upstream ETag makes a new rendition.
 */
import type http from 'node:http';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels } from '../helpers/images.js';
import { startUpstream, type Upstream } from './upstream-server.js';

let up: Upstream;
let t: TestApp;
let grey = 118;
let etag = 1;

const png = async (v: number) =>
  sharp({ create: { width: 32, height: 16, channels: 3, background: { r: v, g: v, b: v } } }).png().toBuffer();

const serveFlat = async (_req: http.IncomingMessage, res: http.ServerResponse) => {
  const body = await png(grey);
  res.writeHead(200, { 'content-type': 'image/png', etag: `"flat-${etag}"`, 'content-length': body.length }).end(body);
};

beforeAll(async () => {
  up = await startUpstream({ '/flat.png': (req, res) => void serveFlat(req, res) });
  t = await build({
    config: {
      origin: {
        upstream: {
          allowHosts: [`http://${up.base}`],
          allowPrivate: true,
          // hang.png needs a header deadline that passes; 1 s leaves room for a slow shared
          // CI machine to answer the other requests. No test here waits for the body deadline.
          headersTimeoutMs: 1000,
          bodyTimeoutMs: 5000,
        },
      },
    },
  });
});
afterAll(async () => {
  await t.close();
  await up.close();
});

const url = (path: string) => `/v1/renditions/~upstream/${up.base}/${path}?width=16&format=png`;

async function problem(path: string, status: number, code: string): Promise<void> {
  const res = await t.app.inject({ url: url(path) });
  expect(res.statusCode, res.body).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.json()).toMatchObject({ status, code });
  expect(res.headers['cache-control']).toBe('no-store');
}

describe('upstream origin through the app', () => {
  it('renders an upstream source; a flat field stays flat (CHECKS.md invariant)', async () => {
    const res = await t.app.inject({ url: url('flat.png') });
    expect(res.statusCode, res.body).toBe(200);
    const img = await pixels(res.rawPayload);
    expect([img.width, img.height, ...at(img, 3, 3)]).toEqual([16, 8, 118, 118, 118]);
  });

  it('a changed upstream ETag gives a new rendition, an unchanged one a cache hit', async () => {
    const first = await t.app.inject({ url: url('flat.png') });
    expect(first.headers['server-timing']).toMatch(/hit/);
    grey = 200;
    etag = 2;
    const changed = await t.app.inject({ url: url('flat.png') });
    expect(changed.headers['server-timing']).toMatch(/miss/);
    expect(at(await pixels(changed.rawPayload), 3, 3)).toEqual([200, 200, 200]);
  });

  it('maps upstream faults to problem+json codes (RFC 9457), never cached', async () => {
    await problem('broken.png', 502, 'ERR_UPSTREAM_FAILED');
    await problem('broken.png', 502, 'ERR_UPSTREAM_FAILED');
    await problem('missing.png', 404, 'ERR_SOURCE_NOT_FOUND');
    await problem('hang.png', 504, 'ERR_UPSTREAM_TIMEOUT');
    await problem('reset.png', 502, 'ERR_UPSTREAM_FAILED');
    await problem('to-metadata.png', 403, 'ERR_UPSTREAM_FORBIDDEN');
  });

  it('refuses hosts off the allowlist', async () => {
    const res = await t.app.inject({ url: `/v1/renditions/~upstream/127.0.0.1:${up.port + 1}/flat.png?width=16` });
    expect(res.json()).toMatchObject({ status: 403, code: 'ERR_UPSTREAM_FORBIDDEN' });
  });

  it('the service still serves correctly after the faults', async () => {
    const res = await t.app.inject({ url: url('flat.png') });
    expect(res.statusCode).toBe(200);
  });
});

describe('upstream origin switched off', () => {
  it('answers 404 ERR_ORIGIN_DISABLED when no upstream host is configured', async () => {
    const off = await build();
    try {
      const res = await off.app.inject({ url: '/v1/renditions/~upstream/127.0.0.1:9/flat.png?width=16' });
      expect(res.json()).toMatchObject({ status: 404, code: 'ERR_ORIGIN_DISABLED' });
    } finally {
      await off.close();
    }
  });
});
