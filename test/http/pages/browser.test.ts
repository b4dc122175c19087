import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoImages, encodeDemo } from '../../../tools/demo/index.js';
import { warmStartPage } from '../../../src/http/warm-start.js';
import { build, type TestApp } from '../../helpers/build.js';
import { browserSkipReason, launchBrowser } from '../../inspect/browser.js';
import { shown } from '../../inspect/view.js';

const sources = ['fabrics/pinstripe.png', 'fabrics/twill.jpg', 'shop/brick-front.jpg'];
/**
 * The tiles are rendered at start as `npm start` does (warmStartPage); the 480 px rendition
 * and the inspector's pictures are rendered fresh from 2000 x 2400 px class sources, which on
 * a shared two-core machine can take tens of seconds: the waits are bounded by these generous
 * limits, not by playwright's 30 s default, and the pool waits for memory up to its 60 s maximum.
 */
const waitMs = 150_000;
const testMs = 300_000;

/** The little of the browser's globals the page reads touch (no DOM library in tests). */
interface Img {
  complete: boolean;
  naturalWidth: number;
  naturalHeight: number;
  currentSrc: string;
}
const tiles = () =>
  [...(globalThis as unknown as { document: { querySelectorAll(s: string): Img[] } }).document.querySelectorAll('.shelf img')].map((i) => ({
    complete: i.complete,
    width: i.naturalWidth,
    height: i.naturalHeight,
    src: i.currentSrc,
  }));
const tilesLoaded = () =>
  [...(globalThis as unknown as { document: { querySelectorAll(s: string): Img[] } }).document.querySelectorAll('.shelf img')].every(
    (i) => i.complete && i.naturalWidth > 0,
  );

describe.skipIf(browserSkipReason)('the start page and the error codes in chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let base: string;
  let folder: string;
  const problems: string[] = [];

  async function open(deviceScaleFactor = 1): Promise<Page> {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 }, deviceScaleFactor });
    page.setDefaultTimeout(waitMs);
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    return page;
  }

  beforeAll(async () => {
    folder = await mkdtemp(join(tmpdir(), 'fw-pages-'));
    for (const path of sources) {
      const demo = demoImages.find((d) => d.path === path);
      if (!demo) throw new Error(`the demo has no ${path}`);
      await mkdir(join(folder, path, '..'), { recursive: true });
      await writeFile(join(folder, path), await encodeDemo(demo.path, demo.make()));
    }
    t = await build({ sourceDir: folder, config: { pool: { maxWaitMs: 60_000 } } });
    await t.app.listen({ host: '127.0.0.1', port: 0 });
    expect(await warmStartPage(t.app)).toEqual({ warmed: 2 * sources.length, failed: 0 });
    base = `http://127.0.0.1:${(t.app.server.address() as AddressInfo).port}`;
    browser = await launchBrowser();
  }, testMs);

  afterAll(async () => {
    await browser?.close();
    await t?.close();
    await rm(folder, { recursive: true, force: true });
  });

  it('/ shows every demo picture as a decoded rendition, the 2x candidate on a 2x screen, no console errors', async () => {
    for (const dpr of [1, 2]) {
      const page = await open(dpr);
      await page.goto(`${base}/`);
      await page.waitForFunction(tilesLoaded, undefined, { timeout: waitMs });
      const seen = await page.evaluate(tiles);
      // Natural sizes are in CSS px (the 2x candidate's 480 x 320 divided by its density).
      expect(seen.map((s) => [s.width, s.height]), `dpr ${dpr}`).toEqual(sources.map(() => [240, 160]));
      expect(seen.map((s) => s.src.endsWith('&density=2')), `dpr ${dpr}`).toEqual(sources.map(() => dpr === 2));
      const shot = join(tmpdir(), `foldwise-start-${dpr}x.png`);
      await page.screenshot({ path: shot, fullPage: true });
      expect((await readFile(shot)).subarray(1, 4).toString()).toBe('PNG');
      console.log(`start page screenshot: ${shot}`);
      await page.close();
    }
    expect(problems).toEqual([]);
  }, testMs);

  it('follows a tile\u2019s link to its rendition, and the form to the inspector with the risk', async () => {
    const page = await open();
    await page.goto(`${base}/`);
    const [response] = await Promise.all([page.waitForNavigation(), page.click('text=480 px >> nth=1')]);
    expect(response?.status()).toBe(200);
    expect(response?.headers()['content-type']).toMatch(/^image\/(webp|avif|jpeg)$/);
    expect(page.url()).toBe(`${base}/v1/renditions/fabrics/twill.jpg?width=480`);
    // Chromium shows an image it navigated to in a document of its own: read its decoded size.
    const img = await page.evaluate(() => {
      const i = (globalThis as unknown as { document: { images: Img[] } }).document.images[0];
      return [i.naturalWidth, i.complete];
    });
    expect(img).toEqual([480, true]);

    await page.goto(`${base}/`);
    await Promise.all([page.waitForNavigation(), page.click('form.try button')]);
    // The form submits `source=fabrics%2Fpinstripe.png`; the inspector then writes its state back
    // into the URL (history.replaceState, `/` unescaped). Either spelling is the same query.
    const landed = new URL(page.url());
    expect([landed.origin + landed.pathname, landed.searchParams.get('source'), landed.searchParams.get('width')]).toEqual([
      `${base}/inspect`,
      'fabrics/pinstripe.png',
      '320',
    ]);
    const view = await shown(page);
    expect(view.planned.width).toBe(320);
    expect(view.levels.planned).toMatch(/^(low|moderate|high):/);
    await page.close();
    expect(problems).toEqual([]);
  }, testMs);

  it('/docs/errors lands on a code (/docs itself: reference-browser.test.ts)', async () => {
    const page = await open();
    await page.goto(`${base}/docs/errors#ERR_SOURCE_NOT_FOUND`);
    const target = await page.evaluate(() => (globalThis as unknown as { document: { querySelector(s: string): { id: string } | null } }).document.querySelector(':target')?.id);
    expect(target).toBe('ERR_SOURCE_NOT_FOUND');
    await page.close();
    expect(problems).toEqual([]);
  });

  it('shows a problem as a page, whose code link lands on its row', async () => {
    const page = await open();
    const response = await page.goto(`${base}/v1/renditions/nope.png?width=10`);
    expect([response?.status(), response?.headers()['content-type']]).toEqual([404, 'text/html; charset=utf-8']);
    expect(await page.title()).toBe('404 \u2013 Source not found');
    await Promise.all([page.waitForNavigation(), page.click('text=ERR_SOURCE_NOT_FOUND')]);
    expect(page.url()).toBe(`${base}/docs/errors#ERR_SOURCE_NOT_FOUND`);
    await page.close();
    // The one console error is Chromium's own note of the 404 it was shown.
    expect(problems).toEqual([expect.stringContaining('404')]);
  });
});
