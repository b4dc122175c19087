import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { browserSkipReason, launchBrowser } from '../inspect/browser.js';
import { png, rampCode, upload } from './fixtures.js';

// The manifest's <picture> read by a real browser engine (Chromium): its HTML parser, its
// srcset/sizes parsing and its candidate selection (HTML Living Standard, "select an image
// source"), and the renditions fetched from the service over loopback.
describe.skipIf(browserSkipReason !== undefined)('the manifest <picture> in Chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let address: string;
  let html: string;

  beforeAll(async () => {
    t = await build();
    address = await t.app.listen({ host: '127.0.0.1', port: 0 });
    html = (await upload(t.app, await png(300, 200, rampCode(300)), '?widths=80,160,240,300')).json().html;
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await t?.close();
  });

  it.each([
    // sizes "(max-width: 300px) 100vw, 300px": the slot is the viewport width up to 300 px;
    // at device pixel ratio 1 the browser takes the narrowest candidate at least that wide.
    [150, 160],
    [700, 300],
  ])("at a %i px viewport it loads the %i px AVIF (first of the upload hook's default formats)", async (viewport, expected) => {
    const page = await browser.newPage({ viewport: { width: viewport, height: 400 }, deviceScaleFactor: 1 });
    try {
      await page.goto(`${address}/healthz`);
      await page.setContent(`<!doctype html><html><body style="margin:0">${html}</body></html>`, { waitUntil: 'load' });
      // Evaluated in the page (a string: this project's type-check has no DOM library).
      const img = await page.evaluate<{ src: string; loaded: boolean; sources: number }>(`(() => {
        const el = document.querySelector('img');
        return { src: el.currentSrc, loaded: el.complete && el.naturalWidth > 0, sources: document.querySelectorAll('picture > source').length };
      })()`);
      expect(img.sources).toBe(1);
      const chosen = new URL(img.src);
      expect(chosen.origin).toBe(address);
      expect(chosen.search).toBe(`?width=${expected}&format=avif`);
      // Loaded and decoded. (naturalWidth itself is density-corrected: width / (w / slot).)
      expect(img.loaded).toBe(true);
    } finally {
      await page.close();
    }
  });
});
