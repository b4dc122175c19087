import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoImages, encodeDemo } from '../../src/demo/index.js';
import { build, type TestApp } from '../helpers/build.js';
import { browserSkipReason, launchBrowser } from './browser.js';
import { cropSpread, failed, shown, startLoadCounter, type View } from './view.js';

/** The demo's striped fabric: 2000 x 2400 px, pinstripes 13.2 px apart. */
const fabric = 'fabrics/pinstripe.png';

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
    const demo = demoImages.find((d) => d.path === fabric);
    if (!demo) throw new Error(`the demo has no ${fabric}`);
    await mkdir(join(folder, 'sources', 'fabrics'), { recursive: true });
    await writeFile(join(folder, 'sources', fabric), await encodeDemo(demo.path, demo.make()));
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

  it('shows both copies, the crops, the map, the spectrum and the numbers for the fabric', async () => {
    await page.goto(`${base}/inspect?source=${fabric}&width=320`);
    first = await shown(page);
    // 2000 x 2400 shrunk to 320 wide keeps the aspect: 384 high; scale 2000 / 320 = 6.25.
    expect(first.naive).toMatchObject({ width: 320, height: 384 });
    expect(first.planned).toMatchObject({ width: 320, height: 384 });
    expect(first.map.width).toBeGreaterThan(0);
    expect(first.spectrum.width).toBeGreaterThan(0);
    expect(first.numbers.scale).toBe('6.25×');
    expect(first.numbers.score).toMatch(/^(low|moderate|high) \(score [01]\.\d\d of 1\)$/);
    expect(first.levels.naive).toMatch(/^(low|moderate|high) risk$/);
    expect(first.levels.planned).toMatch(/^(low|moderate|high) risk$/);
    // The header of the planned rendition names the same plan the report assessed.
    const report = (await fetch(`${base}/v1/alias-risk/${fabric}?width=320`).then((r) => r.json())) as { plan: { header: string } };
    expect(first.plan).toBe(report.plan.header);
    expect(first.peakRows).toBeGreaterThan(0);
    expect(first.zoom.width).toBeGreaterThan(1);
    expect(first.search).toBe(`?source=${fabric}&width=320`);
    expect(first.alts.every((alt) => alt.length > 10)).toBe(true);
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
    expect(next.naive).toMatchObject({ width: 200, height: 240 });
    expect(next.planned).toMatchObject({ width: 200, height: 240 });
    for (const id of ['naive', 'planned', 'map', 'spectrum'] as const) {
      expect(next[id].src).not.toBe(first[id].src);
    }
    const loadsAfter = await page.evaluate<Record<string, number>>('({ ...window.loads })');
    for (const id of ['naive-img', 'planned-img', 'map-img', 'spectrum-img']) {
      expect(loadsAfter[id]).toBe((loadsBefore[id] ?? 0) + 1);
    }
    expect(next.numbers.scale).toBe('10.00×');
    expect(next.numbers.nyquist).not.toBe(first.numbers.nyquist);
    expect(next.numbers.size).toContain('200×240');
    // At 200 px the 13.2 px pinstripes (0.076 cycles/px) lie beyond the new Nyquist, 0.05
    // (Shannon 1949): skipping pixels folds them into false bands, the planned filter removes them.
    expect(next.levels.naive).toBe('high risk');
    expect(next.levels.planned).not.toBe('high risk');
    expect(next.verdict).toContain('careless copy will shimmer');
    const spread = await cropSpread(page);
    console.log(`crop grey-level spread: careless ${spread.naive.toFixed(1)}, foldwise ${spread.planned.toFixed(1)}`);
    expect(spread.naive).toBeGreaterThan(3 * spread.planned);
    expect(await page.evaluate('document.activeElement.id')).toBe('width');
  });

  it('restores the state from the URL on load, and on going back', async () => {
    await page.reload();
    const restored = await shown(page);
    expect(restored.search).toBe(`?source=${fabric}&width=200`);
    expect(await page.inputValue('#width')).toBe('200');
    expect(restored.naive.width).toBe(200);
    await page.goBack();
    const back = await shown(page);
    expect(back.search).toBe(`?source=${fabric}&width=320`);
    expect(await page.inputValue('#width')).toBe('320');
    expect(back.naive.width).toBe(320);
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
    const png = await readFile(shot);
    expect(png.subarray(1, 4).toString()).toBe('PNG');
    console.log(`inspector screenshot: ${shot}`);
  });
});
