/**
 * The object-store origin against s3rver (an npm package serving the S3 HTTP API), started
 * here on a free loopback port with its files in a temporary folder. The test writes and
 * checks objects with the AWS SDK itself, not through foldwise.
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CreateBucketCommand, HeadObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import S3rver from 's3rver';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, gratingCode } from '../ingest/fixtures.js';

const key = 'a signing key for the weaving shop';
let dir: string;
let server: S3rver;
let endpoint: string;
let s3: S3Client;
let t: TestApp;

const put = (object: string, body: Buffer) => s3.send(new PutObjectCommand({ Bucket: 'textiles', Key: object, Body: body }));
const exists = (object: string) =>
  s3.send(new HeadObjectCommand({ Bucket: 'textiles', Key: object })).then(() => true, (e: { $metadata?: { httpStatusCode?: number } }) => {
    if (e.$metadata?.httpStatusCode === 404) return false;
    throw e;
  });

async function storeApp(bucket = 'textiles', extra: Record<string, unknown> = {}): Promise<TestApp> {
  return build({
    config: {
      origin: { storeUrl: `s3://${bucket}/shop`, s3Endpoint: endpoint },
      signing: { keys: [key], required: false },
      limits: { maxSourceBytes: 200_000 },
      ...extra,
    },
  });
}

beforeAll(async () => {
  // s3rver's default credentials; the SDK reads them from the standard variables.
  Object.assign(process.env, { AWS_ACCESS_KEY_ID: 'S3RVER', AWS_SECRET_ACCESS_KEY: 'S3RVER', AWS_REGION: 'us-east-1' });
  dir = await mkdtemp(join(tmpdir(), 'fw-s3-'));
  server = new S3rver({ port: 0, address: '127.0.0.1', silent: true, directory: dir });
  const { port } = (await server.run()) as { port: number };
  endpoint = `http://127.0.0.1:${port}`;
  s3 = new S3Client({ endpoint, forcePathStyle: true, requestChecksumCalculation: 'WHEN_REQUIRED', responseChecksumValidation: 'WHEN_REQUIRED' });
  await s3.send(new CreateBucketCommand({ Bucket: 'textiles' }));
  t = await storeApp();
});
afterAll(async () => {
  await t?.close();
  s3?.destroy();
  await server?.close().catch(() => undefined);
  if (dir) await rm(dir, { recursive: true, force: true });
});

describe('readiness with the object store as origin', () => {
  it('is ready without the folder origin\'s folder (the store is the origin)', async () => {
    const app = await storeApp('textiles', { origin: { storeUrl: 's3://textiles/shop', s3Endpoint: endpoint, sourceDir: join(dir, 'no-such-folder') } });
    try {
      const res = await app.app.inject('/readyz');
      expect(res.statusCode).toBe(200);
      expect(res.json().checks.origin).toEqual({ ok: true, detail: 'object store s3://textiles/shop' });
    } finally {
      await app.close();
    }
  });
});

describe('sources in the object store', () => {
  it('renders an object under the prefix; a changed object gets a new rendition (version from ETag and Last-Modified)', async () => {
    await put('shop/fabrics/twill.png', await png(120, 80, rampCode(120)));
    const first = await t.app.inject('/v1/renditions/fabrics/twill.png?width=60&format=png');
    expect(first.statusCode).toBe(200);
    expect(await sharp(first.rawPayload).metadata()).toMatchObject({ width: 60, height: 40 });
    expect((await t.app.inject('/v1/renditions/fabrics/twill.png?width=60&format=png')).headers.etag).toBe(first.headers.etag);
    await put('shop/fabrics/twill.png', await png(120, 80, gratingCode(0.2)));
    const changed = await t.app.inject('/v1/renditions/fabrics/twill.png?width=60&format=png');
    expect(changed.statusCode).toBe(200);
    expect(changed.headers.etag).not.toBe(first.headers.etag);
  });

  it('answers 404 for a missing object and 413 for one over the byte limit (from Content-Length)', async () => {
    const missing = await t.app.inject('/v1/renditions/fabrics/none.png?width=60');
    expect(missing.statusCode).toBe(404);
    expect(missing.json().code).toBe('ERR_SOURCE_NOT_FOUND');
    const noise = sharp({ create: { width: 400, height: 400, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 128, sigma: 60 } } });
    await put('shop/fabrics/big.png', await noise.png().toBuffer());
    const big = await t.app.inject('/v1/renditions/fabrics/big.png?width=60');
    expect(big.statusCode).toBe(413);
    expect(big.json().code).toBe('ERR_SOURCE_TOO_LARGE');
  });

  it('lists the objects under the prefix', async () => {
    const res = await t.app.inject('/v1/sources');
    expect(res.statusCode).toBe(200);
    expect(res.json().sources.map((s: { path: string }) => s.path)).toEqual(expect.arrayContaining(['fabrics/twill.png', 'fabrics/big.png']));
  });

  it('stores uploads content-addressed in the store, serves their renditions, and deletes them', async () => {
    const bytes = await png(100, 60, rampCode(100));
    const { createHash } = await import('node:crypto');
    const digest = createHash('sha256').update(bytes).digest('hex');
    const res = await t.app.inject({ method: 'POST', url: signUrl('/v1/ingest', { widths: '50', digest }, key), headers: { 'content-type': 'image/png' }, payload: bytes });
    expect(res.statusCode).toBe(200);
    const source = res.json().source.key;
    expect(source).toBe(`uploads/${digest.slice(0, 24)}.png`);
    expect(await exists(`shop/${source}`)).toBe(true);
    expect((await t.app.inject(res.json().renditions[0].url)).statusCode).toBe(200);
    const del = await t.app.inject({ method: 'DELETE', url: signUrl(`/v1/sources/${source}`, {}, key) });
    expect(del.statusCode).toBe(200);
    expect(del.json()).toMatchObject({ removed: true });
    expect(await exists(`shop/${source}`)).toBe(false);
    expect((await t.app.inject(res.json().renditions[0].url)).statusCode).toBe(404);
  });
});

describe('a store that fails', () => {
  it('refusing writes (no such bucket): the upload gets 502 with Retry-After', async () => {
    const other = await storeApp('no-such-bucket');
    try {
      const res = await other.app.inject({ method: 'POST', url: '/v1/ingest?widths=50', headers: { 'content-type': 'image/png' }, payload: await png(64, 64, rampCode(64)) });
      expect(res.statusCode).toBe(502);
      expect(res.json().code).toBe('ERR_STORE_FAILED');
      expect(res.headers['retry-after']).toBe('2');
    } finally {
      await other.close();
    }
  });

  it('down: renditions not cached and uploads get 502 with Retry-After, never a 500', async () => {
    await server.close();
    const res = await t.app.inject('/v1/renditions/fabrics/twill.png?width=30&format=png');
    expect(res.statusCode).toBe(502);
    expect(res.json().code).toBe('ERR_STORE_FAILED');
    expect(res.headers['retry-after']).toBe('2');
    const up = await t.app.inject({ method: 'POST', url: '/v1/ingest', headers: { 'content-type': 'image/png' }, payload: await png(64, 64, rampCode(64)) });
    expect(up.statusCode).toBe(502);
  });
});
