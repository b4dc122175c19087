import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { tileUrls } from '../../src/http/pages/home.js';
import { imgAccept, warmStartPage } from '../../src/http/warm-start.js';
import { demoImages, encodeDemo } from '../../tools/demo/index.js';
import { build, type TestApp } from '../helpers/build.js';

const sources = ['fabrics/twill.jpg', 'products/scarf.png'];

describe('rendering the start page\u2019s tiles at start', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
    for (const path of sources) {
      const demo = demoImages.find((d) => d.path === path);
      if (!demo) throw new Error(`the demo has no ${path}`);
      await mkdir(join(t.sourceDir, path, '..'), { recursive: true });
      await writeFile(join(t.sourceDir, path), await encodeDemo(demo.path, demo.make()));
    }
    await t.app.listen({ host: '127.0.0.1', port: 0 });
  });
  afterAll(() => t.close());

  it('renders both densities of every tile, after which a browser\u2019s request is a cache hit', async () => {
    expect(await warmStartPage(t.app)).toEqual({ warmed: 4, failed: 0 });
    // The tiles the page links are the ones warmed (the same URLs, the same Accept).
    const page = (await t.app.inject({ url: '/' })).body;
    for (const path of sources) {
      for (const url of tileUrls(path)) {
        expect(page).toContain(url.replaceAll('&', '&amp;'));
        const res = await t.app.inject({ url, headers: { accept: imgAccept } });
        expect(res.statusCode, url).toBe(200);
        expect(res.headers['server-timing'], url).toMatch(/cache;desc="hit-memory"/);
      }
    }
  });

  it('stops asking once the server has stopped listening', async () => {
    await new Promise<void>((resolve) => t.app.server.close(() => resolve()));
    expect(await warmStartPage(t.app)).toEqual({ warmed: 0, failed: 0 });
  });
});
