/**
 * The route's memo of parsed rendition URLs (src/http/routes/rendition-url.ts): a repeated URL
 * skips the checks but gets exactly what a fresh parse gives; refusals are never remembered;
 * the memo stays within its byte bound; what it hands out cannot be changed by a caller.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { kernelNames } from '../../src/core/index.js';
import { renditionsPrefix } from '../../src/schemas/paths.js';
import { renditionUrlReader } from '../../src/http/routes/rendition-url.js';
import type { RawQuery } from '../../src/schemas/query.js';
import { compileRenditionQuery } from '../../src/schemas/rendition.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

const compiled = compileRenditionQuery({ maxDimension: 4096, kernelNames });

/** A reader whose zod parses are counted. */
function countingReader(maxBytes?: number) {
  const state = { parses: 0 };
  const reader = renditionUrlReader(
    renditionsPrefix,
    (raw: RawQuery) => {
      state.parses += 1;
      return compiled.parse(raw);
    },
    maxBytes,
  );
  return { reader, state };
}

/** The raw query as Fastify would hand it over (a repeated key becomes an array). */
function rawOf(url: string): RawQuery {
  const raw: RawQuery = {};
  for (const [k, v] of new URLSearchParams(url.split('?')[1] ?? '')) {
    const had = raw[k];
    raw[k] = had === undefined ? v : ([] as string[]).concat(had as string, v);
  }
  return raw;
}

const codeOf = (f: () => unknown): string | undefined => {
  try {
    f();
  } catch (e) {
    return (e as { code?: string }).code;
  }
  return undefined;
};

describe('renditionUrlReader', () => {
  it('a repeated URL is parsed once and reads the same as the first time', () => {
    const { reader, state } = countingReader();
    const url = `${renditionsPrefix}fabrics/twill%20weave.jpg?width=0480&height=320&fit=cover&position=left%20top`;
    const first = reader.read(url, rawOf(url));
    const again = reader.read(url, rawOf(url));
    expect(state.parses).toBe(1);
    expect(again).toEqual(first);
    expect(first.path).toBe('fabrics/twill weave.jpg');
    // The canonical form drops defaults and normalises spellings (DESIGN.md: one key per meaning).
    expect(first.canonical).toBe('fit=cover&height=320&position=0%25%200%25&width=480');
    expect(first.query.width).toBe(480);
  });

  it('never remembers a refusal: each bad URL is checked, and refused, every time', () => {
    const { reader, state } = countingReader();
    const cases: [string, string][] = [
      [`${renditionsPrefix}a.png?width=0`, 'ERR_PARAM_INVALID'],
      [`${renditionsPrefix}a.png?width=1&colour=red`, 'ERR_PARAM_UNKNOWN'],
      [`${renditionsPrefix}a.png?width=1&width=2`, 'ERR_PARAM_REPEATED'],
      [`${renditionsPrefix}a.png?fit=fill`, 'ERR_PARAM_MISSING'],
      [`${renditionsPrefix}..%2fsecret.png?width=1`, 'ERR_SOURCE_PATH_INVALID'],
    ];
    for (const [url, code] of cases) {
      expect(codeOf(() => reader.read(url, rawOf(url)))).toBe(code);
      expect(codeOf(() => reader.read(url, rawOf(url)))).toBe(code);
    }
    expect(reader.size).toBe(0);
    // Four reached zod twice each; the path refusal stops before it.
    expect(state.parses).toBe(8);
  });

  it('stays within its byte bound however many distinct URLs arrive', () => {
    const { reader } = countingReader(64 * 1024);
    for (let w = 1; w <= 2000; w++) {
      const url = `${renditionsPrefix}a.png?width=${w}`;
      reader.read(url, rawOf(url));
    }
    // Each entry counts at least 512 bytes (the query's rough share), so at most 128 fit.
    expect(reader.size).toBeGreaterThan(0);
    expect(reader.size).toBeLessThanOrEqual(128);
  });

  it('hands out frozen results: one request cannot change what the next one reads', () => {
    const { reader } = countingReader();
    const url = `${renditionsPrefix}a.png?width=10&position=30%25%2070%25`;
    const r = reader.read(url, rawOf(url));
    expect(() => {
      (r.query as { width?: number }).width = 9999;
    }).toThrow(TypeError);
    expect(() => {
      (r.query.position as { x: number }).x = 1;
    }).toThrow(TypeError);
    expect(reader.read(url, rawOf(url)).query).toMatchObject({ width: 10, position: { x: 0.3, y: 0.7 } });
  });
});

describe('GET /v1/renditions with the memo in front', () => {
  let t: TestApp;
  const cacheOf = (res: { headers: Record<string, unknown> }) => /cache;desc="([^"]+)"/.exec(String(res.headers['server-timing']))?.[1];

  beforeAll(async () => {
    t = await build();
  });
  afterAll(() => t.close());

  it('remembers the parse, not the answer: a 404 source that appears is rendered next time', async () => {
    const url = '/v1/renditions/late.png?width=8&format=png';
    const before = await t.app.inject({ url });
    expect(before.statusCode).toBe(404);
    expect(before.json()).toMatchObject({ code: 'ERR_SOURCE_NOT_FOUND' });
    await writePng(t.sourceDir, 'late.png', 16, 16, 3, () => [20, 40, 60]);
    const after = await t.app.inject({ url });
    expect(after.statusCode).toBe(200);
    expect(cacheOf(after)).toBe('miss');
    expect(cacheOf(await t.app.inject({ url }))).toBe('hit-memory');
  });

  it('a refused URL stays refused with its problem details on repeat', async () => {
    for (let i = 0; i < 2; i++) {
      const res = await t.app.inject({ url: '/v1/renditions/late.png?width=99999' });
      expect(res.statusCode).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(res.json()).toMatchObject({ code: 'ERR_PARAM_INVALID' });
    }
  });

  it('an absent format still follows each request\'s Accept on one remembered URL', async () => {
    await writePng(t.sourceDir, 'auto.png', 16, 16, 3, () => [200, 100, 50]);
    const url = '/v1/renditions/auto.png?width=8';
    const webp = await t.app.inject({ url, headers: { accept: 'image/webp,*/*' } });
    const jpeg = await t.app.inject({ url, headers: { accept: 'image/jpeg' } });
    const webpAgain = await t.app.inject({ url, headers: { accept: 'image/webp,*/*' } });
    expect(webp.headers['content-type']).toBe('image/webp');
    expect(jpeg.headers['content-type']).toBe('image/jpeg');
    expect(cacheOf(jpeg)).toBe('miss');
    expect(webpAgain.headers['content-type']).toBe('image/webp');
    expect(cacheOf(webpAgain)).toBe('hit-memory');
    expect(webpAgain.headers.vary).toBe('Accept');
  });
});
