/**
 * Callbacks when an ingest job ends (in-process jobs; the queue's are in test/scaleout): a
 * local receiver on loopback checks the signature with its own HMAC (RFC 2104 via
 * node:crypto), a target that fails or stalls is retried, and targets off the upstream
 * allowlist or behind the address guard are refused like upstreams.
 */
import { createHmac } from 'node:crypto';
import { once } from 'node:events';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode } from './fixtures.js';

const key = 'a signing key for the weaving shop';

interface Received {
  headers: IncomingMessage['headers'];
  body: string;
}

/** A receiver whose next answers the test scripts: a status, or 'stall' (never answers). */
async function receiver(script: Array<number | 'stall'>) {
  const received: Received[] = [];
  const stalled: ServerResponse[] = [];
  const server: Server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      received.push({ headers: req.headers, body: Buffer.concat(chunks).toString() });
      const next = script.shift() ?? 204;
      if (next === 'stall') stalled.push(res);
      else res.writeHead(next).end();
      server.emit('received');
    });
  });
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    url,
    received,
    server,
    close: async () => {
      for (const r of stalled) r.destroy();
      server.closeAllConnections();
      server.close();
    },
  };
}

function appFor(allowHosts: string[], extra: Record<string, unknown> = {}) {
  return build({
    config: {
      signing: { keys: [key], required: false },
      origin: { upstream: { allowHosts, allowPrivate: true } },
      ingest: { callbackAttempts: 3, callbackBaseDelayMs: 20, callbackTimeoutMs: 400 },
      ...extra,
    },
  });
}

const post = (t: TestApp, bytes: Buffer, callback: string) =>
  t.app.inject({
    method: 'POST',
    url: `/v1/ingest?widths=64&callback=${encodeURIComponent(callback)}`,
    headers: { 'content-type': 'image/png' },
    payload: bytes,
  });

describe('a job with a callback', () => {
  let r: Awaited<ReturnType<typeof receiver>>;
  let t: TestApp;
  beforeAll(async () => {
    r = await receiver([503, 'stall', 200]);
    t = await appFor([r.url]);
  });
  afterAll(async () => {
    await t?.close();
    await r?.close();
  });

  it('is asynchronous; the outcome arrives signed after a failed and a stalled attempt', async () => {
    const delivered = once(t.app.callbacks, 'delivered');
    const accepted = await post(t, await png(120, 80, rampCode(120)), `${r.url}/hooks/pictures?shop=1`);
    expect(accepted.statusCode).toBe(202);
    const [jobId, status] = await delivered;
    expect(jobId).toBe(accepted.json().id);
    expect(status).toBe(200);
    expect(r.received).toHaveLength(3);
    const last = r.received[2];
    const time = Number(last.headers['foldwise-callback-time']);
    expect(Math.abs(time - Date.now() / 1000)).toBeLessThan(600);
    const expected = createHmac('sha256', key).update(`${time}.${last.body}`).digest('base64url');
    expect(last.headers['foldwise-callback-signature']).toBe(expected);
    expect(last.headers['content-type']).toBe('application/json');
    const outcome = JSON.parse(last.body);
    const job = (await t.app.inject(`/v1/ingest/jobs/${jobId}`)).json();
    expect(outcome).toEqual({ job: jobId, state: 'done', finishedAt: job.finishedAt, manifest: job.manifest });
    // Each attempt is signed at its own time, over the same body.
    expect(r.received.every((x) => x.body === last.body)).toBe(true);
  });
});

describe('callback targets are held to the upstream rules', () => {
  it('refuses a host off the allowlist (403) and a callback without a signing key (400)', async () => {
    const t = await appFor(['http://127.0.0.1:9']);
    try {
      const bytes = await png(64, 64, rampCode(64));
      const off = await post(t, bytes, 'http://169.254.169.254/latest');
      expect(off.statusCode).toBe(403);
      expect(off.json().code).toBe('ERR_UPSTREAM_FORBIDDEN');
      const notHttp = await post(t, bytes, 'file:///etc/passwd');
      expect(notHttp.statusCode).toBe(400);
    } finally {
      await t.close();
    }
    const unsigned = await build({ config: { origin: { upstream: { allowHosts: ['http://127.0.0.1:9'], allowPrivate: true } } } });
    try {
      const res = await post(unsigned, await png(64, 64, rampCode(64)), 'http://127.0.0.1:9/x');
      expect(res.statusCode).toBe(400);
      expect(res.json().code).toBe('ERR_INGEST_CALLBACK_UNSIGNED');
    } finally {
      await unsigned.close();
    }
  });

  it('never connects to a loopback target the address guard refuses; gives up after every attempt', async () => {
    const r = await receiver([]);
    const t = await appFor([r.url], { origin: { upstream: { allowHosts: [r.url], allowPrivate: false } } });
    try {
      const gaveUp = once(t.app.callbacks, 'gave-up');
      const accepted = await post(t, await png(64, 64, rampCode(64)), `${r.url}/hook`);
      expect(accepted.statusCode).toBe(202);
      const [, err] = await gaveUp;
      expect((err as { code: string }).code).toBe('ERR_UPSTREAM_FORBIDDEN');
      expect(r.received).toHaveLength(0);
    } finally {
      await t.close();
      await r.close();
    }
  });
});
