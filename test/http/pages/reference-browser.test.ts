import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../../helpers/build.js';
import { browserSkipReason, launchBrowser } from '../../inspect/browser.js';

/** The little of the browser's globals the page read touches (no DOM library in tests). */
interface El {
  textContent: string | null;
  getAttribute(name: string): string | null;
  querySelector(s: string): El | null;
}
type Doc = { document: { querySelectorAll(s: string): Iterable<El> & { length: number } } };

describe.skipIf(browserSkipReason)('/docs in chromium', () => {
  let t: TestApp;
  let browser: Browser;
  let base: string;

  beforeAll(async () => {
    t = await build();
    await t.app.listen({ host: '127.0.0.1', port: 0 });
    base = `http://127.0.0.1:${(t.app.server.address() as AddressInfo).port}`;
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await t?.close();
  });

  it('draws every operation of /docs/openapi.json, from files of this service only, with no console errors', async () => {
    const document = (await t.app.inject({ url: '/docs/openapi.json' })).json() as { paths: Record<string, Record<string, unknown>> };
    const expected = Object.entries(document.paths)
      .flatMap(([path, methods]) => Object.keys(methods).map((m) => `${m.toUpperCase()} ${path}`))
      .sort();
    expect(expected.length).toBeGreaterThan(10);

    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const problems: string[] = [];
    const requests: string[] = [];
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('request', (r) => requests.push(r.url()));
    await page.goto(`${base}/docs`);
    // Swagger UI fetches the document, then draws one .opblock per operation.
    await page.waitForFunction((n) => (globalThis as unknown as Doc).document.querySelectorAll('.opblock').length >= n, expected.length, { timeout: 60_000 });
    const drawn = await page.evaluate(() =>
      [...(globalThis as unknown as Doc).document.querySelectorAll('.opblock')].map((op) => `${op.querySelector('.opblock-summary-method')?.textContent} ${op.querySelector('.opblock-summary-path')?.getAttribute('data-path')}`),
    );
    expect([...new Set(drawn)].sort()).toEqual(expected);
    expect(await page.title()).toBe('API reference');
    // Opening an operation shows its parameters (the deep link names it), still within the policy.
    await page.click('.opblock-summary-path[data-path="/v1/renditions/{source}"]');
    await page.waitForSelector('.opblock.is-open tr[data-param-name="width"]', { timeout: 30_000 });
    expect(page.url()).toMatch(/\/docs#\/renditions\//);
    await page.screenshot({ path: join(tmpdir(), 'foldwise-docs.png'), fullPage: false });
    await page.close();

    const paths = requests.map((u) => new URL(u)).map((u) => (u.protocol === 'data:' ? 'data:' : `${u.origin}${u.pathname}`));
    expect(paths.filter((u) => u !== 'data:' && !u.startsWith(`${base}/`))).toEqual([]);
    expect(paths).toEqual(expect.arrayContaining([`${base}/docs/assets/swagger-ui-bundle.js`, `${base}/docs/assets/reference.js`, `${base}/docs/openapi.json`]));
    expect(problems).toEqual([]);
  }, 120_000);
});
