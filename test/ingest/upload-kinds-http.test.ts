/**
 * Uploads as CMSs send them: multipart/form-data (RFC 7578) with one file field, and
 * application/octet-stream; other types get a 415 naming the accepted ones. The multipart
 * bodies are encoded by Node's own FormData/Request (undici), not by hand.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, upload } from './fixtures.js';

let t: TestApp;
let bytes: Buffer;
let reference: any;

/** A multipart body with the given files and fields, as a browser or CMS would send it. */
async function form(files: Buffer[], fields: Record<string, string> = {}) {
  const data = new FormData();
  files.forEach((f, i) => data.append(`file${i}`, new Blob([new Uint8Array(f)], { type: 'image/png' }), `picture-${i}.png`));
  for (const [k, v] of Object.entries(fields)) data.append(k, v);
  const request = new Request('http://127.0.0.1/', { method: 'POST', body: data });
  return { payload: Buffer.from(await request.arrayBuffer()), type: request.headers.get('content-type') ?? '' };
}

async function postForm(files: Buffer[], fields: Record<string, string> = {}, query = '') {
  const { payload, type } = await form(files, fields);
  return t.app.inject({ method: 'POST', url: `/v1/ingest${query}`, headers: { 'content-type': type }, payload });
}

beforeAll(async () => {
  t = await build({ config: { limits: { maxUploadBytes: 64 * 1024 } } });
  bytes = await png(240, 160, rampCode(240));
  const res = await upload(t.app, bytes, '?widths=80,160');
  expect(res.statusCode).toBe(200);
  reference = res.json();
});
afterAll(() => t.close());

describe('multipart/form-data uploads', () => {
  it('ingest the one file like the same bytes sent as image/png, fields as query parameters', async () => {
    const res = await postForm([bytes], { widths: '80,160' });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual(reference);
  });

  it('merge fields with the query; a parameter given in both is refused as repeated', async () => {
    const ok = await postForm([bytes], { formats: 'webp' }, '?widths=80');
    expect(ok.statusCode).toBe(200);
    expect(ok.json().renditions.map((r: any) => `${r.format}:${r.width}`)).toEqual(['webp:80']);
    const both = await postForm([bytes], { widths: '80' }, '?widths=160');
    expect(both.statusCode).toBe(400);
    expect(both.json().code).toBe('ERR_PARAM_REPEATED');
  });

  it('refuse two files or none with ERR_INGEST_MULTIPART, and storing nothing new', async () => {
    const two = await postForm([bytes, bytes]);
    expect(two.statusCode).toBe(400);
    expect(two.json()).toMatchObject({ code: 'ERR_INGEST_MULTIPART', detail: expect.stringContaining('more than one file') });
    const none = await postForm([], { widths: '80' });
    expect(none.statusCode).toBe(400);
    expect(none.json()).toMatchObject({ code: 'ERR_INGEST_MULTIPART', detail: expect.stringContaining('no file') });
  });

  it('refuse a file over limits.maxUploadBytes with 413 while it streams', async () => {
    const big = Buffer.alloc(64 * 1024 + 1, 7);
    const res = await postForm([big]);
    expect(res.statusCode).toBe(413);
    expect(res.json().code).toBe('ERR_INGEST_TOO_LARGE');
  });

  it('refuse unknown fields as unknown parameters', async () => {
    const res = await postForm([bytes], { colour: 'red' });
    expect(res.statusCode).toBe(400);
    expect(res.json().code).toBe('ERR_PARAM_UNKNOWN');
  });
});

describe('application/octet-stream uploads', () => {
  it('sniff the format from the bytes and answer the same manifest', async () => {
    const res = await upload(t.app, bytes, '?widths=80,160', { 'content-type': 'application/octet-stream' });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual(reference);
  });

  it('refuse bytes that are no picture with the decoder codes, not a 500', async () => {
    const res = await upload(t.app, Buffer.from('plain words, not a picture'), '', { 'content-type': 'application/octet-stream' });
    expect(res.statusCode).toBeGreaterThanOrEqual(400);
    expect(res.statusCode).toBeLessThan(500);
    expect(res.json().code).toMatch(/^ERR_SOURCE_/);
  });
});

it('refuses other media types with 415 naming every accepted one', async () => {
  const res = await upload(t.app, Buffer.from('<svg/>'), '', { 'content-type': 'text/html' });
  expect(res.statusCode).toBe(415);
  const { code, detail } = res.json();
  expect(code).toBe('ERR_INGEST_MEDIA_TYPE');
  for (const type of ['image/*', 'application/octet-stream', 'multipart/form-data', 'application/json']) expect(detail).toContain(type);
});

describe('server.publicUrl', () => {
  let pub: TestApp;
  beforeAll(async () => {
    pub = await build({ config: { server: { publicUrl: 'https://img.textile-shop.test/' } } });
  });
  afterAll(() => pub.close());

  it('makes manifest, srcset and src URLs absolute under it (trailing slash dropped)', async () => {
    const res = await upload(pub.app, bytes, '?widths=80,160');
    expect(res.statusCode).toBe(200);
    const m = res.json();
    for (const r of m.renditions) expect(r.url).toBe(`https://img.textile-shop.test/v1/renditions/${m.source.key}?width=${r.width}&format=${r.format}`);
    expect(m.srcset.avif.split(', ')[0]).toBe(`https://img.textile-shop.test/v1/renditions/${m.source.key}?width=80&format=avif 80w`);
    expect(m.src.startsWith('https://img.textile-shop.test/v1/renditions/')).toBe(true);
  });
});
