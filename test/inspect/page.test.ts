import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { kernelNames } from '../../src/core/index.js';
import { demoImages, encodeDemo } from '../../tools/demo/index.js';
import { build, type TestApp } from '../helpers/build.js';
import { browserSkipReason, launchBrowser } from './browser.js';
import { cropSpread, failed, inkIn, shown, startLoadCounter, type View } from './view.js';

/** The demo's striped fabric: 2000 x 2400 px, pinstripes 13.2 px apart. */
const fabric = 'fabrics/pinstripe.png';
/** A second cloth that sorts before it, so a bare /inspect cannot open on it by sorting. */
const other = 'fabrics/gingham.png';

describe.skipIf(browserSkipReason)('the inspector page in chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let page: Page;
  let base: string;
  let folder: string;
  const requested: string[] = [];
  const problems: string[] = [];

  beforeAll(async () => {
    folder = await mkdtemp(join(tmpdir(), 'fw-inspect-'));
    await mkdir(join(folder, 'sources', 'fabrics'), { recursive: true });
    for (const path of [fabric, other]) {
      const demo = demoImages.find((d) => d.path === path);
      if (!demo) throw new Error(`the demo has no ${path}`);
      await writeFile(join(folder, 'sources', path), await encodeDemo(demo.path, demo.make()));
    }
    t = await build({ sourceDir: join(folder, 'sources') });
    await t.app.listen({ host: '127.0.0.1', port: 0 });
    base = `http://127.0.0.1:${(t.app.server.address() as AddressInfo).port}`;
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    page.on('request', (r) => requested.push(r.url()));
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    await startLoadCounter(page);
  });

  afterAll(async () => {
    await browser?.close();
    await t?.close();
    await rm(folder, { recursive: true, force: true });
  });

  let first: View;

  it('opens bare on the pinstripe at 320 px: both copies, the crops, the map, the spectrum and the numbers', async () => {
    await page.goto(`${base}/inspect`);
    first = await shown(page);
    expect(first.search).toBe(`?source=${fabric}&width=320`);
    // 2000 x 2400 shrunk to 320 wide keeps the aspect: 384 high; scale 2000 / 320 = 6.25.
    expect(first.legacy).toMatchObject({ width: 320, height: 384 });
    expect(first.planned).toMatchObject({ width: 320, height: 384 });
    expect(first.points.hidden).toBe(true);
    // The legacy look as common resizers make it: encoded values, Lanczos-3, nothing removed first.
    const legacy = requested.find((u) => u.includes('/v1/renditions/') && u.includes('light=encoded'));
    expect(new URL(String(legacy)).searchParams.get('kernel')).toBe('lanczos-3');
    expect(new URL(String(legacy)).searchParams.get('prefilter')).toBe('none');
    expect(first.numbers.scale).toBe('6.25×');
    expect(first.levels.legacy).toMatch(/^(low|moderate|high): /);
    expect(first.levels.planned).toMatch(/^(low|moderate|high): /);
    // The header of the planned rendition names the same plan the report assessed.
    const report = (await fetch(`${base}/v1/alias-risk/${fabric}?width=320`).then((r) => r.json())) as { plan: { header: string } };
    expect(first.plan).toBe(report.plan.header);
    expect(first.patternNames.length).toBeGreaterThan(0);
    for (const name of first.patternNames) expect(name).toMatch(/^(folds |beats|passes cleanly)/);
    expect(first.zoom.width).toBeGreaterThan(1);
    expect(first.alts.every((alt) => alt.length > 10)).toBe(true);
    expect(first.kernels).toEqual(['auto', ...kernelNames]);
    // Linear-light mean of 0 and 1 is 0.5, encoded 188 (IEC 61966-2-1); the code mean is 128.
    expect(first.lighter).toMatch(/188, not 128/);
    // The page shows each copy's level as its own report gives it.
    const level = async (q: string) => ((await fetch(`${base}/v1/alias-risk/${fabric}?width=320${q}`).then((r) => r.json())) as { level: string }).level;
    expect(first.levels.planned.split(':')[0]).toBe(await level(''));
    expect(first.levels.legacy.split(':')[0]).toBe(await level('&light=encoded&kernel=lanczos-3&prefilter=none'));
    // Stripes 13.2 source px apart at scale 6.25 are 0.47 cycles per output px, just under the
    // new Nyquist 0.5 (Shannon 1949): a copy that keeps them shows them swelling and fading
    // every 1 / (1 - 2 x 0.47) = 16-19 px; one that shows the cloth's tone instead is even.
    const spread = await cropSpread(page);
    console.log(`crop grey-level spread at 320 px: legacy ${spread.legacy.toFixed(1)}, foldwise ${spread.planned.toFixed(1)}`);
    expect(spread.legacy).toBeGreaterThan(2 * spread.planned);
  });

  it('draws the spectrum with labelled axes and the map with a legend strip', async () => {
    // The spectrum: a 512 px plot, 64 px left, 30 top, 48 below (labels), 120 right (colour bar).
    expect(first.spectrum).toMatchObject({ width: 64 + 512 + 120, height: 30 + 512 + 48 });
    expect(await inkIn(page, 'spectrum-img', { x0: 64, y0: 30 + 512 + 2, x1: 64 + 512, y1: 30 + 512 + 48 })).toBeGreaterThan(200);
    expect(await inkIn(page, 'spectrum-img', { x0: 0, y0: 30, x1: 60, y1: 30 + 512 })).toBeGreaterThan(100);
    // The map: a 640 px preview (640 x 768 for 2000 x 2400) and a 96 px legend under it.
    expect(first.map).toMatchObject({ width: 640, height: 768 + 96 });
    expect(await inkIn(page, 'map-img', { x0: 0, y0: 768, x1: 480, y1: 768 + 96 })).toBeGreaterThan(200);
  });

  it('changes the width with the keyboard alone and updates pictures, numbers and URL', async () => {
    const historyBefore = await page.evaluate('history.length');
    const loadsBefore = await page.evaluate<Record<string, number>>('({ ...window.loads })');
    // Focus order from the top: the skip link, the picture field, then the width.
    for (const expected of ['skip', 'source', 'width']) {
      await page.keyboard.press('Tab');
      expect(await page.evaluate('document.activeElement.id || document.activeElement.className')).toBe(expected);
    }
    await page.keyboard.press('Control+A');
    await page.keyboard.type('200');
    const planned = page.waitForResponse((r) => r.url().includes('/v1/renditions/') && r.url().includes('width=200'));
    const report = page.waitForResponse((r) => r.url().includes('/v1/alias-risk/') && r.url().includes('width=200'));
    await page.keyboard.press('Enter');
    expect((await planned).ok()).toBe(true);
    expect((await report).ok()).toBe(true);
    const next = await shown(page);

    expect(next.search).toBe(`?source=${fabric}&width=200`);
    expect(await page.evaluate('history.length')).toBe(Number(historyBefore) + 1);
    expect(next.legacy).toMatchObject({ width: 200, height: 240 });
    expect(next.planned).toMatchObject({ width: 200, height: 240 });
    for (const id of ['legacy', 'planned', 'map', 'spectrum'] as const) {
      expect(next[id].src).not.toBe(first[id].src);
    }
    const loadsAfter = await page.evaluate<Record<string, number>>('({ ...window.loads })');
    for (const id of ['legacy-img', 'planned-img', 'map-img', 'spectrum-img']) {
      expect(loadsAfter[id]).toBe((loadsBefore[id] ?? 0) + 1);
    }
    expect(next.numbers.scale).toBe('10.00×');
    expect(next.numbers.nyquist).not.toBe(first.numbers.nyquist);
    expect(next.numbers.size).toContain('200×240');
    // At 200 px the 13.2 px pinstripes (0.076 cycles/px) lie beyond the new Nyquist, 0.05
    // (Shannon 1949): the page names the folds it lists as folds.
    expect(next.patternNames.some((name) => name.startsWith('folds '))).toBe(true);
    expect(await page.evaluate('document.activeElement.id')).toBe('width');
  });

  it('restores the state from the URL on load, and on going back', async () => {
    await page.reload();
    const restored = await shown(page);
    expect(restored.search).toBe(`?source=${fabric}&width=200`);
    expect(await page.inputValue('#width')).toBe('200');
    expect(restored.legacy.width).toBe(200);
    await page.goBack();
    const back = await shown(page);
    expect(back.search).toBe(`?source=${fabric}&width=320`);
    expect(await page.inputValue('#width')).toBe('320');
    expect(back.legacy.width).toBe(320);
  });

  it('shows point sampling as a third copy on request, with its own level and crop', async () => {
    await page.check('#points');
    await page.press('#width', 'Enter');
    const three = await shown(page);
    expect(three.search).toBe(`?source=${fabric}&width=320&points=shown`);
    expect(three.points).toMatchObject({ width: 320, height: 384, hidden: false });
    expect(three.levels.points).toMatch(/^(low|moderate|high): /);
    expect(await page.evaluate(`document.getElementById('points-zoom').width`)).toBe(three.zoom.width);
    await page.uncheck('#points');
    await page.press('#width', 'Enter');
    expect((await shown(page)).points.hidden).toBe(true);
  });

  it('says in words when the service refuses, and keeps the URL honest', async () => {
    await page.fill('#source', 'fabrics/no-such-cloth.png');
    await page.press('#source', 'Enter');
    await failed(page);
    expect(await page.textContent('#status')).toMatch(/not found/i);
    expect(new URL(page.url()).searchParams.get('source')).toBe('fabrics/no-such-cloth.png');
  });

  it('loaded nothing from anywhere but this service, without script errors, and looks right', async () => {
    await page.goto(`${base}/inspect?source=${fabric}&width=200`);
    await shown(page);
    const foreign = requested.filter((url) => !url.startsWith(`${base}/`) && !url.startsWith('blob:'));
    expect(foreign).toEqual([]);
    // The one console error allowed is the 404 of the refused source above.
    expect(problems.filter((p) => !p.includes('404'))).toEqual([]);
    const shot = join(tmpdir(), 'foldwise-inspector.png');
    await page.screenshot({ path: shot, fullPage: true });
    expect((await readFile(shot)).subarray(1, 4).toString()).toBe('PNG');
    // The same page at three device pixels per CSS pixel, for a close look at text and crops.
    const close = await browser.newPage({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 3 });
    await close.goto(`${base}/inspect?source=${fabric}&width=320`);
    await shown(close);
    const zoomed = join(tmpdir(), 'foldwise-inspector-3x.png');
    await close.screenshot({ path: zoomed, fullPage: true });
    await close.close();
    expect((await readFile(zoomed)).subarray(1, 4).toString()).toBe('PNG');
    console.log(`inspector screenshots: ${shot}, ${zoomed}`);
  });
});
