import { mkdir, readFile, writeFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { errorCodes } from '../../../src/errors.js';
import { demoImages, encodeDemo } from '../../../tools/demo/index.js';
import { build, type TestApp } from '../../helpers/build.js';

const browser = 'text/html,application/xhtml+xml,application/xml;q=0.9,image/avif,image/webp,*/*;q=0.8';
const sources = ['fabrics/twill.jpg', 'shop/brick-front.jpg'];

async function demoFolder(t: TestApp): Promise<void> {
  for (const path of sources) {
    const demo = demoImages.find((d) => d.path === path);
    if (!demo) throw new Error(`the demo has no ${path}`);
    await mkdir(join(t.sourceDir, path, '..'), { recursive: true });
    await writeFile(join(t.sourceDir, path), await encodeDemo(demo.path, demo.make()));
  }
}

/** Every href and src of a page (srcset candidates too), entities undone. */
function links(html: string): string[] {
  const out = [...html.matchAll(/\s(?:href|src)="([^"]*)"/g)].map((m) => m[1]);
  for (const m of html.matchAll(/\ssrcset="([^"]*)"/g)) out.push(...m[1].split(',').map((c) => c.trim().split(/\s+/)[0]));
  return out.map((u) => u.replaceAll('&amp;', '&'));
}

const ids = (html: string) => new Set([...html.matchAll(/\sid="([^"]*)"/g)].map((m) => m[1]));

describe('the pages a browser meets', () => {
  let t: TestApp;
  const get = (url: string, accept?: string) => t.app.inject({ url, headers: accept ? { accept } : {} });

  beforeAll(async () => {
    t = await build();
    await demoFolder(t);
  });
  afterAll(() => t.close());

  it.each(['/', '/docs', '/docs/errors'])('%s is an HTML page whose every link and picture resolves', async (url) => {
    const res = await get(url, browser);
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(res.headers['content-security-policy']).toContain("default-src 'none'");
    const all = links(res.body);
    expect(all.length).toBeGreaterThan(4);
    const own = ids(res.body);
    for (const link of all) {
      if (link.startsWith('#')) {
        expect(own.has(decodeURIComponent(link.slice(1))), `${url} -> ${link}`).toBe(true);
        continue;
      }
      expect(link.startsWith('/'), `${url} links only to this service: ${link}`).toBe(true);
      const target = await get(link.split('#')[0]);
      expect(target.statusCode, `${url} -> ${link}`).toBe(200);
    }
  });

  it('/ names every place a developer needs and shows each demo picture as a rendition with its links', async () => {
    const body = (await get('/')).body;
    const all = links(body);
    for (const place of ['/inspect', '/docs', '/docs/errors', '/v1/sources', '/healthz', '/metrics', '/docs/openapi.json']) expect(all).toContain(place);
    for (const path of sources) {
      expect(all).toContain(`/v1/renditions/${path}?width=240&height=160&fit=cover`);
      expect(all).toContain(`/v1/renditions/${path}?width=480`);
      expect(all).toContain(`/v1/alias-risk/${path}?width=480`);
      expect(all).toContain(`/inspect?source=${path}&width=320`);
    }
    expect(body).toMatch(/<form class="try" method="get" action="\/inspect">/);
    const url = `/v1/renditions/${sources[0]}?width=240&height=160&fit=cover&density=2`;
    const tile = await get(url, 'image/webp,*/*');
    // The negotiated WebP, unless it is larger than the JPEG: then the JPEG (src/rendition/smallest.ts).
    const [webp, jpeg] = [(await get(`${url}&format=webp`)).rawPayload, (await get(`${url}&format=jpeg`)).rawPayload];
    const [type, expected] = webp.length < jpeg.length ? ['image/webp', webp] : ['image/jpeg', jpeg];
    expect([tile.statusCode, tile.headers['content-type']]).toEqual([200, type]);
    expect(tile.rawPayload.equals(expected as Buffer)).toBe(true);
  });

  it('/docs is a page that loads Swagger UI and its start script from this service only', async () => {
    const res = await get('/docs', browser);
    expect([res.statusCode, res.headers['content-type'], res.headers['cache-control']]).toEqual([200, 'text/html; charset=utf-8', 'no-cache']);
    // The page policy, widened for this page only: scripts and fetches from this origin, data: icons.
    expect(String(res.headers['content-security-policy']).split('; ')).toEqual([
      "default-src 'none'", "script-src 'self'", "style-src 'self'", "img-src 'self' data:", "connect-src 'self'",
      "form-action 'self'", "base-uri 'none'", "frame-ancestors 'none'",
    ]);
    expect((await get('/')).headers['content-security-policy']).not.toContain('script-src');
    expect([...res.body.matchAll(/<script([^>]*)>/g)].map((m) => m[1])).toEqual([' src="/docs/assets/swagger-ui-bundle.js"', ' src="/docs/assets/reference.js"']);
    expect(links(res.body)).toEqual(expect.arrayContaining(['/docs/assets/swagger-ui.css', '/docs/assets/reference.css']));
    expect(res.body).not.toMatch(/https?:\/\//);
  });

  it.each([
    // The package's files, byte for byte as npm installed them; ours, with the document's URL and no public validator.
    ['swagger-ui-bundle.js', 'text/javascript; charset=utf-8', 'public, max-age=86400', 'swagger-ui-dist/swagger-ui-bundle.js'],
    ['swagger-ui.css', 'text/css; charset=utf-8', 'public, max-age=86400', 'swagger-ui-dist/swagger-ui.css'],
    ['reference.js', 'text/javascript; charset=utf-8', 'no-cache', undefined],
    ['reference.css', 'text/css; charset=utf-8', 'no-cache', undefined],
  ])('/docs/assets/%s is served with its type, caching and an ETag that revalidates', async (name, type, cache, file) => {
    const res = await get(`/docs/assets/${name}`);
    expect([res.statusCode, res.headers['content-type'], res.headers['cache-control'], res.headers['x-content-type-options']]).toEqual([200, type, cache, 'nosniff']);
    if (file) expect(res.rawPayload.equals(await readFile(createRequire(import.meta.url).resolve(file)))).toBe(true);
    else expect(res.body.length).toBeGreaterThan(200);
    if (name === 'reference.js') expect(res.body).toMatch(/url: '\/docs\/openapi\.json'[\s\S]*validatorUrl: null/);
    const again = await t.app.inject({ url: `/docs/assets/${name}`, headers: { 'if-none-match': String(res.headers.etag) } });
    expect([again.statusCode, again.body]).toEqual([304, '']);
  });

  it('/docs/assets answers 404 for a file it does not serve, the package\'s other files included', async () => {
    for (const name of ['index.html', 'swagger-initializer.js', '..%2Fpackage.json']) {
      const res = await get(`/docs/assets/${name}`);
      expect([res.statusCode, res.json().code], name).toEqual([404, 'ERR_NOT_FOUND']);
    }
  });

  it('/docs/errors has one anchor per code of the registry, with its status and title', async () => {
    const body = (await get('/docs/errors')).body;
    const own = ids(body);
    for (const [code, { status, title }] of Object.entries(errorCodes)) {
      expect(own.has(code), code).toBe(true);
      const row = body.match(new RegExp(`<tr id="${code}">.*?</tr>`))?.[0] ?? '';
      expect(row).toContain(`>${status}</td>`);
      expect(row).toContain(title.replaceAll('&', '&amp;').replaceAll("'", '&#39;'));
    }
  });

  it('answers a problem as a page to a browser and as problem+json to everyone else, same status', async () => {
    const url = '/v1/renditions/fabrics/twill.jpg?widht=20';
    const page = await get(url, browser);
    expect([page.statusCode, page.headers['content-type'], page.headers['cache-control']]).toEqual([400, 'text/html; charset=utf-8', 'no-store']);
    expect(page.body).toContain('<title>400 \u2013 Unknown parameter</title>');
    expect(page.body).toContain('<a href="/docs/errors#ERR_PARAM_UNKNOWN"><code>ERR_PARAM_UNKNOWN</code></a>');
    expect(page.body).toContain(`<code>${page.headers['x-request-id']}</code>`);
    for (const accept of [undefined, '*/*', 'image/webp,*/*;q=0.8', 'application/json, text/html']) {
      const json = await get(url, accept);
      expect([json.statusCode, json.headers['content-type']], String(accept)).toEqual([400, 'application/problem+json; charset=utf-8']);
      expect(json.json()).toMatchObject({ code: 'ERR_PARAM_UNKNOWN', type: '/docs/errors#ERR_PARAM_UNKNOWN' });
    }
    // A 5xx page shows the title only, as the JSON does; an unknown route is a page too.
    const missing = await get('/no/such/page', browser);
    expect([missing.statusCode, missing.headers['content-type']]).toEqual([404, 'text/html; charset=utf-8']);
    expect(missing.body).toContain('no route for GET /no/such/page');
  });

  it('escapes what a request puts into a page', async () => {
    const res = await get('/v1/renditions/a.png?<script>x=1', browser);
    expect(res.statusCode).toBe(400);
    expect(res.body).not.toContain('<script>');
    expect(res.body).toContain('unknown parameter: &lt;script&gt;x');
  });
});

describe('the start page when renditions need a signature or listing is off', () => {
  it('shows no live pictures and says how to sign when signing is required', async () => {
    const t = await build({ config: { signing: { keys: ['a-signing-key-of-32-characters!!'] } } });
    try {
      await demoFolder(t);
      const res = await t.app.inject({ url: '/' });
      expect(res.statusCode).toBe(200);
      expect(links(res.body).filter((l) => l.startsWith('/v1/renditions/') || l.startsWith('/v1/alias-risk/'))).toEqual([]);
      expect(res.body).toContain('Signing is on');
      expect(res.body).toContain(`<code>${sources[0]}</code>`);
    } finally {
      await t.close();
    }
  });

  it('says listing is off instead of listing', async () => {
    const t = await build({ config: { origin: { listing: false } } });
    try {
      await demoFolder(t);
      const res = await t.app.inject({ url: '/' });
      expect(res.statusCode).toBe(200);
      expect(res.body).toContain('Listing sources is switched off');
      expect(res.body).not.toContain(sources[0]);
    } finally {
      await t.close();
    }
  });
});
