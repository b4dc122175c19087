import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';

// Uploads over a real socket on loopback: the byte limit on a chunked body (no Content-Length,
// RFC 9112 section 7.1) and a client that disappears mid-upload.
let t: TestApp;
let port: number;
const limit = 32 * 1024;

beforeAll(async () => {
  t = await build({ config: { limits: { maxUploadBytes: limit } } });
  const address = await t.app.listen({ host: '127.0.0.1', port: 0 });
  port = Number(new URL(address).port);
});
afterAll(() => t.close());

function post(headers: Record<string, string>) {
  return request({ host: '127.0.0.1', port, method: 'POST', path: '/v1/ingest', headers });
}

describe('upload bodies on a socket', () => {
  it('cuts off a chunked upload past the limit with 413 ERR_INGEST_TOO_LARGE', async () => {
    const req = post({ 'content-type': 'image/png', 'transfer-encoding': 'chunked' });
    const answer = new Promise<{ status: number; body: string }>((resolve, reject) => {
      req.on('response', (res) => {
        let body = '';
        res.setEncoding('utf8').on('data', (d: string) => (body += d));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      });
      req.on('error', reject);
    });
    // Write until the server answers (it must, without reading the whole body).
    const chunk = Buffer.alloc(8 * 1024, 1);
    let sent = 0;
    while (sent <= 4 * limit && !req.destroyed) {
      if (!req.write(chunk)) await new Promise((resolve) => req.once('drain', resolve));
      sent += chunk.length;
    }
    req.end();
    const { status, body } = await answer;
    expect(status).toBe(413);
    expect(JSON.parse(body).code).toBe('ERR_INGEST_TOO_LARGE');
  });

  it('keeps serving after a client drops an upload half-way', async () => {
    const req = post({ 'content-type': 'image/png', 'content-length': String(limit) });
    req.on('error', () => undefined); // the reset we cause ourselves
    req.write(Buffer.alloc(1024, 7));
    await new Promise((resolve) => setImmediate(resolve));
    req.destroy();
    const health = await fetch(`http://127.0.0.1:${port}/healthz`);
    expect(health.status).toBe(200);
  });
});
