import { mkdir, mkdtemp, rm, symlink } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorCodes } from '../../src/errors.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

/** The RFC 9457 shape (type, title, status, detail) plus our code; no stack, never cacheable. */
function expectProblem(res: { statusCode: number; headers: Record<string, unknown>; json(): any; body: string }, status: number, code: string) {
  expect(res.statusCode, res.body).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.headers['cache-control']).toBe('no-store');
  const body = res.json();
  expect(body).toMatchObject({ status, code, title: errorCodes[code as keyof typeof errorCodes].title });
  expect(body.type).toBe(`/docs/errors#${code}`);
  expect(typeof body.detail).toBe('string');
  expect(res.body).not.toMatch(/\bat .+\.(ts|js):\d+/); // no stack frames
  return body;
}

describe('GET /v1/renditions: refusals', () => {
  let t: TestApp;
  let outside: string;
  const get = (url: string) => t.app.inject({ url });

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'a.png', 8, 8, 3, () => [10, 20, 30]);
    outside = await mkdtemp(join(tmpdir(), 'fw-outside-'));
    await writePng(outside, 'secret.png', 8, 8, 3, () => [1, 2, 3]);
    await symlink(join(outside, 'secret.png'), join(t.sourceDir, 'link.png'));
    await mkdir(join(t.sourceDir, 'sub'));
  });
  afterAll(async () => {
    await t.close();
    await rm(outside, { recursive: true, force: true });
  });

  it.each([
    ['unknown parameter', 'width=10&wdith=3', 'ERR_PARAM_UNKNOWN'],
    ['repeated parameter', 'width=10&width=20', 'ERR_PARAM_REPEATED'],
    ['no size', 'format=png', 'ERR_PARAM_MISSING'],
    ['zero width', 'width=0', 'ERR_PARAM_INVALID'],
    ['width above the limit', 'width=8193', 'ERR_PARAM_INVALID'],
    ['NaN width', 'width=NaN', 'ERR_PARAM_INVALID'],
    ['negative height', 'height=-5', 'ERR_PARAM_INVALID'],
    ['exponent width', 'width=1e3', 'ERR_PARAM_INVALID'],
    ['fractional width', 'width=10.5', 'ERR_PARAM_INVALID'],
    ['empty width', 'width=', 'ERR_PARAM_INVALID'],
    ['density below 0.5', 'width=10&density=0.25', 'ERR_PARAM_INVALID'],
    ['density above 4', 'width=10&density=5', 'ERR_PARAM_INVALID'],
    ['bad fit', 'width=10&fit=stretch', 'ERR_PARAM_INVALID'],
    ['bad position', 'width=10&position=middle%20nowhere', 'ERR_PARAM_INVALID'],
    ['bad format', 'width=10&format=tiff', 'ERR_PARAM_INVALID'],
    ['quality 0', 'width=10&quality=0', 'ERR_PARAM_INVALID'],
    ['quality 101', 'width=10&quality=101', 'ERR_PARAM_INVALID'],
    ['bad background', 'width=10&background=red', 'ERR_PARAM_INVALID'],
    ['bad kernel', 'width=10&kernel=bicubic2', 'ERR_PARAM_INVALID'],
    ['negative prefilter', 'width=10&prefilter=-1', 'ERR_PARAM_INVALID'],
    ['huge prefilter', 'width=10&prefilter=65', 'ERR_PARAM_INVALID'],
    ['bad light', 'width=10&light=gamma', 'ERR_PARAM_INVALID'],
  ])('%s -> 400', async (_what, query, code) => {
    const body = expectProblem(await get(`/v1/renditions/a.png?${query}`), 400, code);
    expect(body.detail.length).toBeGreaterThan(0);
  });

  it('names the offending parameter in the detail', async () => {
    expect(expectProblem(await get('/v1/renditions/a.png?width=10&zz=1'), 400, 'ERR_PARAM_UNKNOWN').detail).toMatch(/zz/);
    expect(expectProblem(await get('/v1/renditions/a.png?width=0'), 400, 'ERR_PARAM_INVALID').detail).toMatch(/width/);
  });

  it('refuses an output beyond limits.maxOutputPixels before any work', async () => {
    // 8000 x 8000 = 64 MP against the default 40 MP; each side is within maxDimension (8192).
    expectProblem(await get('/v1/renditions/a.png?width=8000&height=8000'), 422, 'ERR_OUTPUT_TOO_LARGE');
    // density multiplies a side past maxDimension.
    expectProblem(await get('/v1/renditions/a.png?width=5000&density=2'), 422, 'ERR_LIMIT_OUTPUT_DIMENSION');
  });

  it('missing source -> 404 ERR_SOURCE_NOT_FOUND, and the 404 is not cached', async () => {
    expectProblem(await get('/v1/renditions/late.png?width=4'), 404, 'ERR_SOURCE_NOT_FOUND');
    await writePng(t.sourceDir, 'late.png', 8, 8, 3, () => [0, 0, 0]);
    const res = await get('/v1/renditions/late.png?width=4');
    expect(res.statusCode).toBe(200);
    expect(res.headers['server-timing']).toMatch(/cache;desc="miss"/);
  });

  it('unknown route -> 404 ERR_NOT_FOUND', async () => {
    expectProblem(await get('/v2/nothing'), 404, 'ERR_NOT_FOUND');
  });

  it('a file that is not an image is refused, not crashed on', async () => {
    const { writeFile } = await import('node:fs/promises');
    await writeFile(join(t.sourceDir, 'broken.png'), Buffer.from('not a png at all'));
    const res = await get('/v1/renditions/broken.png?width=4');
    expect([415, 422]).toContain(res.statusCode);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect((await get('/healthz')).statusCode).toBe(200); // still alive
  });

  it.each([
    ['..', '/v1/renditions/../a.png?width=4'],
    ['.. inside', '/v1/renditions/sub/../../a.png?width=4'],
    ['%2e%2e', '/v1/renditions/%2e%2e/a.png?width=4'],
    ['%2E%2E mixed', '/v1/renditions/sub/%2E%2e/%2e%2E/a.png?width=4'],
    ['%2f', '/v1/renditions/sub%2f..%2fa.png?width=4'],
    ['%5c', '/v1/renditions/sub%5c..%5ca.png?width=4'],
    ['NUL', '/v1/renditions/a.png%00.png?width=4'],
    ['empty segment', '/v1/renditions/sub//a.png?width=4'],
  ])('path traversal refused: %s', async (_what, url) => {
    const res = await get(url);
    expect([400, 404]).toContain(res.statusCode);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    expect(res.json().code).toMatch(/ERR_SOURCE_PATH_INVALID|ERR_NOT_FOUND/);
  });

  it('a symlink that points out of the root is refused', async () => {
    const res = await get('/v1/renditions/link.png?width=4');
    expect([400, 403, 404]).toContain(res.statusCode);
    expect(res.json().code).toMatch(/ERR_SOURCE_PATH_INVALID|ERR_SOURCE_NOT_FOUND/);
  });
});
