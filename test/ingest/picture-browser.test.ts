import type { Browser, BrowserContext, Page, Route } from 'playwright-core';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { browserSkipReason, launchBrowser } from '../inspect/browser.js';
import { png, rampCode, upload } from './fixtures.js';
import { pickCandidate } from './srcset-pick.js';

// The manifest's <picture> read by a real browser engine (Chromium): its HTML parser, its
// srcset/sizes parsing, its candidate selection, its layout (width/height reserve the box:
// HTML Living Standard, "Dimension attributes" map them to aspect-ratio), and the renditions
// fetched from the service over loopback. Layout shift is Chromium's Layout Instability API
// (W3C draft, "layout-shift" performance entries); the chosen file is read from Resource
// Timing entries (W3C Resource Timing), not only from currentSrc.
const ladder = [160, 320, 480, 640, 800, 1080, 1280, 1600, 1920, 2400];

/** A page with the snippet and a paragraph after it, so a shift of the picture moves text. */
const pageOf = (snippet: string) =>
  `<!doctype html><html><head><meta charset="utf-8"><title>t</title></head><body style="margin:0">${snippet}<p id="after">woven text</p></body></html>`;

interface Held {
  /** Resolves with the first image request's URL, while it is held. */
  requested: Promise<string>;
  release(): void;
}

/** Serves `html` at /page.html of the service's origin and holds image requests until released. */
async function openHeld(context: BrowserContext, address: string, html: string): Promise<{ page: Page; held: Held }> {
  let seen!: (url: string) => void;
  let release!: () => void;
  const requested = new Promise<string>((r) => (seen = r));
  const released = new Promise<void>((r) => (release = r));
  await context.route(`${address}/page.html`, (route) => route.fulfill({ contentType: 'text/html', body: html }));
  await context.route(`${address}/v1/renditions/**`, async (route: Route) => {
    seen(route.request().url());
    await released;
    await route.continue();
  });
  // Layout shifts are summed from the start (buffered), as the Layout Instability API reports them.
  await context.addInitScript(`window.__shift = 0; new PerformanceObserver((l) => { for (const e of l.getEntries()) window.__shift += e.value; }).observe({ type: 'layout-shift', buffered: true });`);
  const page = await context.newPage();
  await page.goto(`${address}/page.html`, { waitUntil: 'domcontentloaded' });
  return { page, held: { requested, release } };
}

/** Evaluated in the page (strings: this project's type-check has no DOM library). */
const boxes = `(() => { const r = document.querySelector('img').getBoundingClientRect(); return { width: r.width, height: r.height, after: document.getElementById('after').getBoundingClientRect().top }; })()`;
const settled = `(async () => {
  const img = document.querySelector('img');
  await img.decode();
  // Two frames: the frame that paints the image has been laid out and its shifts reported.
  await new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)));
  return {
    src: img.currentSrc,
    naturalWidth: img.naturalWidth,
    shift: window.__shift,
    fetched: performance.getEntriesByType('resource').filter((e) => e.initiatorType === 'img').map((e) => e.name),
  };
})()`;

describe.skipIf(browserSkipReason !== undefined)('the manifest <picture> in Chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let address: string;
  let manifest: any;

  beforeAll(async () => {
    t = await build();
    address = await t.app.listen({ host: '127.0.0.1', port: 0 });
    // 2400 x 1500: every ladder width has a whole height (x 5/8), so each file's aspect ratio is
    // exactly the box's and a correct page cannot shift by a rounding pixel.
    // No formats given: the upload hook's default formats, avif,jpeg (config), so AVIF is chosen.
    const res = await upload(t.app, await png(2400, 1500, rampCode(2400)));
    expect(res.statusCode, res.body).toBe(200);
    manifest = res.json();
    expect(manifest.renditions.filter((r: any) => r.format === 'avif').map((r: any) => r.width)).toEqual(ladder);
    browser = await launchBrowser();
  }, 180_000);
  afterAll(async () => {
    await browser?.close();
    await t?.close();
  });

  it('the selection rule gives the table worked out by hand', () => {
    // sizes=100vw: the slot is the viewport. E.g. 375 px at ratio 3: 1080w is density 2.88,
    // 1280w 3.41, the first to reach 3; 768 px at ratio 2: 1600w is 2.08.
    const table = [375, 768, 1440].map((v) => [1, 2, 3].map((d) => pickCandidate(ladder, v, d)));
    expect(table).toEqual([
      [480, 800, 1280],
      [800, 1600, 2400],
      [1600, 2400, 2400],
    ]);
  });

  for (const viewport of [375, 768, 1440]) {
    for (const dpr of [1, 2, 3]) {
      it(`at ${viewport} px and ratio ${dpr}: the predicted AVIF, decoded, in a box that does not move`, async () => {
        const expected = pickCandidate(ladder, viewport, dpr);
        const context = await browser.newContext({ viewport: { width: viewport, height: 900 }, deviceScaleFactor: dpr });
        try {
          const { page, held } = await openHeld(context, address, pageOf(manifest.html));
          const url = new URL(await held.requested);
          // The box before any image byte: the column's width, the height from width/height.
          const before = await page.evaluate<{ width: number; height: number; after: number }>(boxes);
          expect(before.width).toBe(viewport);
          expect(before.height).toBeCloseTo((viewport * 1500) / 2400, 0);
          held.release();
          const done = await page.evaluate<{ src: string; naturalWidth: number; shift: number; fetched: string[] }>(settled);
          expect(url.search).toBe(`?width=${expected}&format=avif`);
          expect(done.src).toBe(url.href);
          // Exactly one image was fetched: the chosen candidate (no fallback, no second pick).
          expect(done.fetched).toEqual([url.href]);
          expect(done.naturalWidth).toBeGreaterThan(0);
          expect(await page.evaluate<{ width: number; height: number; after: number }>(boxes)).toEqual(before);
          expect(done.shift).toBe(0);
        } finally {
          await context.close();
        }
      });
    }
  }

  it('the placeholder decodes in Chromium, and the placeholder html shows it in the box until the image arrives', async () => {
    const { placeholder } = manifest;
    const context = await browser.newContext({ viewport: { width: 768, height: 900 }, deviceScaleFactor: 1 });
    try {
      const { page, held } = await openHeld(context, address, pageOf(manifest.htmlWithPlaceholder));
      const decoded = await page.evaluate<number[]>(
        `(async () => { const i = new Image(); i.src = ${JSON.stringify(placeholder.dataUri)}; await i.decode(); return [i.naturalWidth, i.naturalHeight]; })()`,
      );
      expect(decoded).toEqual([placeholder.width, placeholder.height]);
      await held.requested;
      // While the image is held: the box shows the placeholder, a ramp from green-blue on the
      // left to red-blue on the right (rampCode), not an empty box.
      const shot = await page.locator('img').screenshot({ path: process.env.FOLDWISE_SHOTS ? `${process.env.FOLDWISE_SHOTS}/placeholder-held.png` : undefined });
      const { data, info } = await sharp(shot).raw().toBuffer({ resolveWithObject: true });
      const px = (x: number) => [...data.subarray((Math.floor(info.height / 2) * info.width + x) * info.channels, (Math.floor(info.height / 2) * info.width + x) * info.channels + 3)];
      const [left, right] = [px(10), px(info.width - 10)];
      expect(left[1] - left[0]).toBeGreaterThan(150);
      expect(right[0] - right[1]).toBeGreaterThan(150);
      held.release();
      const done = await page.evaluate<{ shift: number; naturalWidth: number }>(settled);
      expect(done.naturalWidth).toBeGreaterThan(0);
      expect(done.shift).toBe(0);
    } finally {
      await context.close();
    }
  });

  it('the same page without width and height does shift (the measurement can fail)', async () => {
    const context = await browser.newContext({ viewport: { width: 768, height: 900 }, deviceScaleFactor: 1 });
    try {
      const bare = manifest.html.replace(/ width="\d+" height="\d+"/, '');
      expect(bare).not.toBe(manifest.html);
      const { page, held } = await openHeld(context, address, pageOf(bare));
      await held.requested;
      held.release();
      const done = await page.evaluate<{ shift: number }>(settled);
      expect(done.shift).toBeGreaterThan(0);
    } finally {
      await context.close();
    }
  });
});
