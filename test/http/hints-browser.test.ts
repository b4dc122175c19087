import type { Browser, Request } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { quadrantColour, writePng } from '../helpers/images.js';
import { browserSkipReason, launchBrowser } from '../inspect/browser.js';

// Client Hints end to end in Chromium: a page whose response carries Accept-CH (RFC 8942)
// opts the browser in; the browser then sends Sec-CH-DPR and, for an <img> with sizes,
// Sec-CH-Width (device px) on the image request to the same origin (Responsive Image Client
// Hints draft, from memory; http://127.0.0.1 counts as a secure context, W3C Secure Contexts
// "potentially trustworthy"). Expected widths follow the README's rule: Sec-CH-Width rounded
// up to the ladder (300 -> 327, 600 -> 642, 900 -> 942).
describe.skipIf(browserSkipReason !== undefined)('width=hinted in Chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let address: string;

  beforeAll(async () => {
    t = await build();
    await writePng(t.sourceDir, 'quad.png', 1000, 500, 3, quadrantColour(1000, 500));
    address = await t.app.listen({ host: '127.0.0.1', port: 0 });
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await t?.close();
  });

  it.each([
    [1, '300', 327],
    [2, '600', 642],
    [3, '900', 942],
  ])('at ratio %i the browser sends Sec-CH-Width %s and gets %i px', async (dpr, sent, width) => {
    const context = await browser.newContext({ viewport: { width: 800, height: 600 }, deviceScaleFactor: dpr });
    try {
      const html = `<!doctype html><html><body><img src="/v1/renditions/quad.png?format=png&amp;width=hinted&amp;slot=300" sizes="300px" width="300" alt=""></body></html>`;
      await context.route(`${address}/page.html`, (route) =>
        route.fulfill({ contentType: 'text/html', headers: { 'accept-ch': 'Sec-CH-DPR, Sec-CH-Width' }, body: html }),
      );
      const page = await context.newPage();
      const image = page.waitForRequest((r: Request) => r.url().includes('/v1/renditions/'));
      await page.goto(`${address}/page.html`, { waitUntil: 'load' });
      const request = await image;
      const headers = await request.allHeaders();
      expect([headers['sec-ch-width'], headers['sec-ch-dpr']]).toEqual([sent, String(dpr)]);
      const response = await request.response();
      expect(response?.headers()['rendition-width']).toBe(`${width};from=sec-ch-width`);
      const natural = await page.evaluate<number>(`(async () => { const i = document.querySelector('img'); await i.decode(); return i.naturalWidth; })()`);
      expect(natural).toBe(width);
    } finally {
      await context.close();
    }
  });

  it('without Accept-CH on the page the browser sends no hints, and the answer is slot x density', async () => {
    const context = await browser.newContext({ viewport: { width: 800, height: 600 }, deviceScaleFactor: 2 });
    try {
      const html = `<!doctype html><html><body><img src="/v1/renditions/quad.png?format=png&amp;width=hinted&amp;slot=300" sizes="300px" width="300" alt=""></body></html>`;
      await context.route(`${address}/page.html`, (route) => route.fulfill({ contentType: 'text/html', body: html }));
      const page = await context.newPage();
      const image = page.waitForRequest((r: Request) => r.url().includes('/v1/renditions/'));
      await page.goto(`${address}/page.html`, { waitUntil: 'load' });
      const request = await image;
      const headers = await request.allHeaders();
      expect([headers['sec-ch-width'], headers['sec-ch-dpr']]).toEqual([undefined, undefined]);
      expect((await request.response())?.headers()['rendition-width']).toBe('300;from=fallback');
    } finally {
      await context.close();
    }
  });
});
