/**
 * Hostile uploads to POST /v1/ingest over a real socket on 127.0.0.1: a Content-Length above
 * the limit (refused before the body is read), a chunked body that grows past it, a gzip
 * bomb, empty and non-image bodies, a pixel bomb and a wrong media type. Each gets its
 * problem+json code, nothing is stored or cached, and the service still renders afterwards.
 */
import { readdir } from 'node:fs/promises';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { memoryEntries } from '../security/cache-probe.js';
import { hostileSources } from './sources.js';

const limit = 256 * 1024;
let t: TestApp;
let port = 0;
let bomb: Buffer;

interface Answer {
  status: number;
  type: string;
  body: Record<string, unknown>;
}

/** Sends headers, then `chunks` one by one; resolves with the answer (possibly before all are sent). */
function post(headers: Record<string, string | number>, chunks: Buffer[]): Promise<Answer> {
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, method: 'POST', path: '/v1/ingest?widths=32', headers, agent: false }, (res) => {
      const parts: Buffer[] = [];
      res.on('data', (c: Buffer) => parts.push(c));
      res.on('end', () => {
        req.destroy();
        const text = Buffer.concat(parts).toString();
        resolve({ status: res.statusCode ?? 0, type: String(res.headers['content-type']), body: JSON.parse(text || '{}') });
      });
    });
    // The server may answer and close before every byte is sent: that is the point.
    req.on('error', (e: NodeJS.ErrnoException) => (e.code === 'EPIPE' || e.code === 'ECONNRESET' ? undefined : reject(e)));
    let i = 0;
    const next = (): void => {
      if (i < chunks.length) req.write(chunks[i++], next);
      else req.end();
    };
    next();
  });
}

async function stored(): Promise<number> {
  return (await readdir(join(t.sourceDir, 'uploads'), { recursive: true }).catch(() => [])).length;
}

interface UploadCase {
  name: string;
  headers: Record<string, string | number>;
  chunks: () => Buffer[];
  status: number;
  code: string;
}

const cases: UploadCase[] = [
  { name: 'Content-Length above the limit, refused unread', headers: { 'content-type': 'image/png', 'content-length': 10 * limit }, chunks: () => [Buffer.alloc(1024)], status: 413, code: 'ERR_INGEST_TOO_LARGE' },
  { name: 'a declared 1 TB body', headers: { 'content-type': 'image/png', 'content-length': 10 ** 12 }, chunks: () => [Buffer.alloc(16)], status: 413, code: 'ERR_INGEST_TOO_LARGE' },
  { name: 'chunked body growing past the limit', headers: { 'content-type': 'image/jpeg', 'transfer-encoding': 'chunked' }, chunks: () => Array.from({ length: 40 }, () => Buffer.alloc(16 * 1024, 7)), status: 413, code: 'ERR_INGEST_TOO_LARGE' },
  { name: 'gzip bomb sent as Content-Encoding: gzip', headers: { 'content-type': 'image/png', 'content-encoding': 'gzip' }, chunks: () => [gzipSync(Buffer.alloc(64 * 1024 * 1024))], status: 415, code: 'ERR_SOURCE_UNSUPPORTED' },
  { name: 'empty body', headers: { 'content-type': 'image/png', 'content-length': 0 }, chunks: () => [], status: 400, code: 'ERR_INGEST_EMPTY' },
  { name: 'text sent as image/png', headers: { 'content-type': 'image/png' }, chunks: () => [Buffer.from('not an image at all')], status: 415, code: 'ERR_SOURCE_UNSUPPORTED' },
  { name: 'PNG pixel bomb (16000 x 16000)', headers: { 'content-type': 'image/png' }, chunks: () => [bomb], status: 422, code: 'ERR_SOURCE_PIXELS_EXCEEDED' },
  { name: 'HTML media type', headers: { 'content-type': 'text/html' }, chunks: () => [Buffer.from('<p>hi</p>')], status: 415, code: 'ERR_INGEST_MEDIA_TYPE' },
];

beforeAll(async () => {
  t = await build({ config: { limits: { maxUploadBytes: limit } } });
  await writePng(t.sourceDir, 'control.png', 32, 32, 3, () => [50, 60, 70]);
  bomb = (await hostileSources('http://127.0.0.1:9/unused.png')).find((c) => c.file === 'bomb-16k.png')!.bytes;
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
});
afterAll(() => t.close());

describe('hostile uploads', () => {
  it.each(cases)('$name -> $status $code', async (c) => {
    const [files, cached] = [await stored(), memoryEntries(t.app)];
    const answer = await post(c.headers, c.chunks());
    expect(answer.status).toBe(c.status);
    expect(answer.type).toMatch(/^application\/problem\+json/);
    expect(answer.body).toMatchObject({ status: c.status, code: c.code });
    expect(await stored()).toBe(files);
    expect(memoryEntries(t.app)).toBe(cached);
    const control = await t.app.inject({ url: '/v1/renditions/control.png?width=16&format=png' });
    expect(control.statusCode).toBe(200);
  });

  it('a proper upload still works afterwards', async () => {
    const png = await import('node:fs/promises').then((fs) => fs.readFile(join(t.sourceDir, 'control.png')));
    const answer = await post({ 'content-type': 'image/png' }, [png]);
    expect(answer.status).toBe(200);
    expect(await stored()).toBe(1);
  });
});
