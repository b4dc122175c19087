import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { kernelNames } from '../../src/core/index.js';
import { legacyLook, pointSampling } from '../../src/inspector/copies.js';
import { build, type TestApp } from '../helpers/build.js';

describe('GET /inspect and its assets', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
  });
  afterAll(() => t.close());

  it('serves the page with a policy that keeps it on this service', async () => {
    const res = await t.app.inject({ url: '/inspect' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe('text/html; charset=utf-8');
    const csp = String(res.headers['content-security-policy']);
    // Content Security Policy Level 3 (W3C): 'self' plus blob: images, nothing else.
    expect(csp).toContain("default-src 'none'");
    expect(csp).toContain("connect-src 'self'");
    expect(csp).not.toMatch(/https?:|\*/);
    // Every reference in the page is relative to the service: no other host is named.
    expect(res.body).not.toMatch(/(src|href)="(https?:)?\/\//);
    expect(res.body).toContain('inspect/assets/client.js');
    expect(res.body).toContain('inspect/assets/style.css');
  });

  it('serves the client script bundled at build time for the browser, with a strong validator', async () => {
    const first = await t.app.inject({ url: '/inspect/assets/client.js' });
    expect(first.statusCode).toBe(200);
    // The bytes scripts/bundle-inspector.mjs wrote (made at start from the sources if stale), not a compile per process.
    expect(first.rawPayload.equals(readFileSync(new URL('../../dist/inspector/client.js', import.meta.url)))).toBe(true);
    expect(first.headers['content-type']).toBe('text/javascript; charset=utf-8');
    // Bundled: no TypeScript-only syntax and no module imports left for the browser to fetch.
    expect(first.body).not.toMatch(/^import /m);
    expect(first.body).not.toMatch(/: HTMLElement\b/);
    expect(first.body).toContain('history');
    const etag = String(first.headers.etag);
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    const again = await t.app.inject({ url: '/inspect/assets/client.js' });
    expect(again.headers.etag).toBe(etag);
    const revalidated = await t.app.inject({ url: '/inspect/assets/client.js', headers: { 'if-none-match': etag } });
    expect(revalidated.statusCode).toBe(304);
    expect(revalidated.body).toBe('');
    // RFC 9110, section 13.1.2: If-None-Match may list several entity tags.
    const listed = await t.app.inject({ url: '/inspect/assets/client.js', headers: { 'if-none-match': `"other", ${etag}` } });
    expect(listed.statusCode).toBe(304);
  });

  it('lists every kernel of the core table in the Kernel menu, and auto first', async () => {
    const res = await t.app.inject({ url: '/inspect' });
    const select = /<select id="kernel"[^>]*>([\s\S]*?)<\/select>/.exec(res.body)?.[1] ?? '';
    const values = [...select.matchAll(/<option value="([^"]+)"/g)].map((m) => m[1]);
    expect(values).toEqual(['auto', ...kernelNames]);
    expect(values).toContain('bandlimit');
    expect(res.body).toContain('Prefilter sigma (source px)');
    expect(res.body).not.toMatch(/blur radius/i);
  });

  it('asks for the legacy look and point sampling with kernels the service accepts', () => {
    expect(kernelNames).toContain(legacyLook.kernel);
    expect(kernelNames).toContain(pointSampling.kernel);
  });

  it('answers HEAD for the page without a body', async () => {
    const res = await t.app.inject({ method: 'HEAD', url: '/inspect' });
    expect(res.statusCode).toBe(200);
    expect(res.body).toBe('');
    expect(res.headers['content-type']).toBe('text/html; charset=utf-8');
  });

  it('serves the stylesheet and the icon', async () => {
    const css = await t.app.inject({ url: '/inspect/assets/style.css' });
    expect(css.statusCode).toBe(200);
    expect(css.headers['content-type']).toBe('text/css; charset=utf-8');
    expect(css.body).toContain(':focus-visible');
    const icon = await t.app.inject({ url: '/inspect/assets/icon.svg' });
    expect(icon.headers['content-type']).toBe('image/svg+xml');
  });

  it.each(['client.ts', 'page.html', 'state.ts', '..%2Fpage.html', 'tsconfig.json'])(
    'answers 404 problem details for an asset it does not serve: %s',
    async (name) => {
      const res = await t.app.inject({ url: `/inspect/assets/${name}` });
      expect(res.statusCode).toBe(404);
      expect(res.headers['content-type']).toContain('application/problem+json');
      expect(res.json().code).toBe('ERR_NOT_FOUND');
    },
  );
});
