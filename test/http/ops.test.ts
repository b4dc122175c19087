import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

describe('operational endpoints', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'swatch.png', 16, 16, 3, () => [90, 60, 30]);
    const { mkdir } = await import('node:fs/promises');
    await mkdir(`${t.sourceDir}/fabrics`);
    await writePng(`${t.sourceDir}/fabrics`, 'twill weave.png', 16, 16, 3, () => [30, 60, 90]);
  });
  afterAll(() => t.close());

  it('/healthz is ok', async () => {
    const res = await t.app.inject({ url: '/healthz' });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual({ status: 'ok' });
    expect(res.headers['x-request-id']).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/); // none sent: a fresh UUID
  });

  it('/readyz reports its checks', async () => {
    const res = await t.app.inject({ url: '/readyz' });
    expect(res.statusCode).toBe(200);
    expect(res.json().status).toBe('ready');
    expect(res.json().checks.pool.ok).toBe(true);
  });

  it('/readyz is a 503 problem when the source folder is gone', async () => {
    const gone = await build({ sourceDir: '/nonexistent/fw-sources' });
    try {
      const res = await gone.app.inject({ url: '/readyz' });
      expect(res.statusCode).toBe(503);
      expect(res.json().code).toBe('ERR_NOT_READY');
      expect(res.json().detail).toMatch(/origin/);
    } finally {
      await gone.close();
    }
  });

  it('keeps a plain caller-supplied request id and replaces a hostile one', async () => {
    const kept = await t.app.inject({ url: '/healthz', headers: { 'x-request-id': 'cdn-123.abc' } });
    expect(kept.headers['x-request-id']).toBe('cdn-123.abc');
    const replaced = await t.app.inject({ url: '/healthz', headers: { 'x-request-id': 'a\nb<script>' } });
    expect(replaced.headers['x-request-id']).not.toMatch(/script/);
  });

  it('/metrics exposes requests by route and status, stages, cache and pool', async () => {
    await t.app.inject({ url: '/v1/renditions/swatch.png?width=8&format=png' });
    await t.app.inject({ url: '/v1/renditions/swatch.png?width=8&format=png' });
    await t.app.inject({ url: '/v1/renditions/swatch.png?width=0' });
    // The disk tier is written after the answer (renderRendition's answerFirst).
    await t.app.renditionCache.cache.settled();
    const res = await t.app.inject({ url: '/metrics' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/plain/);
    const text = res.body;
    // Prometheus text exposition format 0.0.4 (prometheus.io docs, from memory): name{labels} value
    expect(text).toMatch(/foldwise_http_requests_total\{route="\/v1\/renditions\/\*",method="GET",status="200"\} 2/);
    expect(text).toMatch(/foldwise_http_requests_total\{route="\/v1\/renditions\/\*",method="GET",status="400"\} 1/);
    expect(text).toMatch(/foldwise_http_request_duration_seconds_bucket\{le="[^"]+",route="\/v1\/renditions\/\*"/);
    for (const stage of ['origin', 'decode', 'resample', 'encode', 'cache']) {
      expect(text).toMatch(new RegExp(`foldwise_render_stage_seconds_count\\{stage="${stage}"\\} [1-9]`));
    }
    expect(text).toMatch(/foldwise_cache_lookups_total\{result="miss"\} 1/);
    expect(text).toMatch(/foldwise_cache_lookups_total\{result="hit-memory"\} 1/);
    expect(text).toMatch(/foldwise_cache_bytes\{tier="memory"\} [1-9]/);
    expect(text).toMatch(/foldwise_cache_stored_bytes_total\{tier="memory"\} [1-9]/);
    expect(text).toMatch(/foldwise_cache_stored_bytes_total\{tier="disk"\} [1-9]/);
    expect(text).toMatch(/foldwise_pool_queue_depth 0/);
    expect(text).toMatch(/foldwise_process_resident_memory_bytes/);
  });

  it('/docs/openapi.json is an OpenAPI 3.1 document generated from the zod schemas', async () => {
    const doc = (await t.app.inject({ url: '/docs/openapi.json' })).json();
    expect(doc.openapi).toBe('3.1.0');
    const op = doc.paths['/v1/renditions/{source}'].get;
    const params = Object.fromEntries(op.parameters.map((p: { name: string }) => [p.name, p]));
    for (const name of ['source', 'width', 'height', 'density', 'fit', 'position', 'format', 'quality', 'background', 'kernel', 'prefilter', 'light', 'signature']) {
      expect(params[name]?.in, name).toBe(name === 'source' ? 'path' : 'query');
    }
    // Limits come from config, enums from the core's kernel table.
    expect(params.width.schema).toMatchObject({ type: 'integer', minimum: 1, maximum: t.config.limits.maxDimension });
    expect(params.fit.schema.enum).toEqual(['contain', 'cover', 'fill', 'scale-down']);
    expect(params.kernel.schema.enum).toContain('lanczos-3');
    expect(op.responses['400'].content['application/problem+json'].schema).toEqual({ $ref: '#/components/schemas/Problem' });
    for (const path of ['/', '/v1/sources', '/healthz', '/readyz', '/metrics', '/docs', '/docs/errors', '/docs/errors.json']) expect(Object.keys(doc.paths[path] ?? {}), path).toContain('get');
    expect(doc.components.schemas.Problem.properties.code.enum).toContain('ERR_PARAM_UNKNOWN');
  });

  it('/docs/errors.json lists every code with status and title', async () => {
    const { errors } = (await t.app.inject({ url: '/docs/errors.json' })).json();
    expect(errors).toContainEqual({ code: 'ERR_SOURCE_NOT_FOUND', status: 404, title: 'Source not found' });
  });

  it('/v1/sources lists the folder origin with rendition links', async () => {
    const res = await t.app.inject({ url: '/v1/sources' });
    expect(res.statusCode).toBe(200);
    const { sources } = res.json();
    const paths = sources.map((s: { path: string }) => s.path).sort();
    expect(paths).toEqual(['fabrics/twill weave.png', 'swatch.png']);
    const woven = sources.find((s: { path: string }) => s.path.startsWith('fabrics/'));
    expect(woven.rendition).toBe('/v1/renditions/fabrics/twill%20weave.png?width=480');
    expect((await t.app.inject({ url: woven.rendition.replace('480', '8') })).statusCode).toBe(200);
  });

  it('/v1/sources signs its example links only for a signed listing request when signing is on', async () => {
    const key = 'ops-test-key-0123456789';
    const signed = await build({ sourceDir: t.sourceDir, config: { signing: { keys: [key] } } });
    try {
      const { signUrl } = await import('../../src/security/signing.js');
      const swatchOf = async (url: string) =>
        (await signed.app.inject({ url })).json().sources.find((s: { path: string }) => s.path === 'swatch.png');
      // Public listing: the unsigned URL, which the service refuses, so nothing usable is handed out.
      const open = await swatchOf('/v1/sources');
      expect(open.rendition).toBe('/v1/renditions/swatch.png?width=480');
      expect((await signed.app.inject({ url: open.rendition })).json().code).toBe('ERR_SIGNATURE_REQUIRED');
      // The key holder's signed listing: signed examples that render as given.
      const listing = signUrl('/v1/sources', {}, key);
      const mine = await swatchOf(listing);
      expect(mine.rendition).toMatch(/^\/v1\/renditions\/swatch\.png\?width=480&signature=[\w-]{43}$/);
      expect((await signed.app.inject({ url: mine.rendition })).statusCode).toBe(200);
      const forged = await signed.app.inject({ url: signUrl('/v1/sources', {}, 'another-key-0123456789') });
      expect([forged.statusCode, forged.json().code]).toEqual([403, 'ERR_SIGNATURE_INVALID']);
    } finally {
      await signed.close();
    }
  });

  it('/v1/sources can be switched off', async () => {
    const off = await build({ sourceDir: t.sourceDir, config: { origin: { listing: false } } });
    try {
      const res = await off.app.inject({ url: '/v1/sources' });
      expect(res.statusCode).toBe(404);
      expect(res.json().code).toBe('ERR_ORIGIN_DISABLED');
    } finally {
      await off.close();
    }
  });
});
