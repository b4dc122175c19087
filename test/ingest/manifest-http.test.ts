import { createHash } from 'node:crypto';
import { stat } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RenditionEvent } from '../../src/ingest/service.js';
import { build, type TestApp } from '../helpers/build.js';
import { png, rampCode, upload } from './fixtures.js';
import { parseSrcset, widthDescriptors } from './srcset-parse.js';

let t: TestApp;
const events: RenditionEvent[] = [];
let analyses = 0;

beforeAll(async () => {
  t = await build();
  t.app.ingest.on('rendition', (e: RenditionEvent) => events.push(e));
  t.app.ingest.on('analysed', () => analyses++);
});
afterAll(() => t.close());

describe('POST /v1/ingest with image bytes', () => {
  let bytes: Buffer;
  let manifest: any;

  beforeAll(async () => {
    bytes = await png(300, 200, rampCode(300));
    const res = await upload(t.app, bytes, '?widths=80,160,240,400');
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    manifest = res.json();
  });

  it('stores the bytes under their SHA-256 key and describes the source', async () => {
    // FIPS 180-4 SHA-256 via node:crypto; the key keeps 24 hex characters (config default).
    const digest = createHash('sha256').update(bytes).digest('hex');
    expect(manifest.source).toEqual({ key: `uploads/${digest.slice(0, 24)}.png`, width: 300, height: 200 });
    expect((await stat(join(t.sourceDir, manifest.source.key))).size).toBe(bytes.length);
  });

  it('lists one rendition per width and format, never wider than the source', () => {
    const widths = [80, 160, 240, 300];
    expect(manifest.renditions.map((r: any) => `${r.format}:${r.width}x${r.height}`)).toEqual(
      ['avif', 'jpeg'].flatMap((f) => widths.map((w) => `${f}:${w}x${Math.round((w * 200) / 300)}`)),
    );
    for (const r of manifest.renditions) {
      expect(r.url).toBe(`/v1/renditions/${manifest.source.key}?width=${r.width}&format=${r.format}`);
      expect(r.bytes).toBeGreaterThan(0);
      expect(r.etag).toMatch(/^"[^"]+"$/); // RFC 9110 section 8.8.3: a strong entity-tag is quoted
      expect(['low', 'moderate', 'high']).toContain(r.risk.level);
      expect(r.risk.score).toBeGreaterThanOrEqual(0);
      expect(r.risk.score).toBeLessThanOrEqual(1);
    }
    expect(manifest.sizes).toBe('100vw'); // issue 17: the default spans the viewport
    expect(manifest.warnings).toEqual([]);
  });

  it('gives a srcset per format that parses (HTML Living Standard) with ascending w descriptors', () => {
    expect(Object.keys(manifest.srcset)).toEqual(['avif', 'jpeg']);
    for (const [format, srcset] of Object.entries(manifest.srcset as Record<string, string>)) {
      const parsed = parseSrcset(srcset);
      const widths = widthDescriptors(parsed);
      expect(widths).toEqual([...widths].sort((a, b) => a - b));
      expect(new Set(widths).size).toBe(widths.length);
      const own = manifest.renditions.filter((r: any) => r.format === format);
      expect(parsed.map((c) => c.url)).toEqual(own.map((r: any) => r.url));
    }
  });

  it('gives a <picture> element ready to paste, with the fallback format in <img>', () => {
    const jpeg300 = manifest.renditions.find((r: any) => r.format === 'jpeg' && r.width === 300);
    expect(manifest.src).toBe(jpeg300.url);
    // HTML Living Standard: inside a double-quoted attribute value "&" is written "&amp;".
    const esc = (v: string) => v.replaceAll('&', '&amp;');
    expect(manifest.html).toBe(
      [
        '<picture>',
        `  <source type="image/avif" srcset="${esc(manifest.srcset.avif)}" sizes="${manifest.sizes}">`,
        `  <img src="${esc(jpeg300.url)}" srcset="${esc(manifest.srcset.jpeg)}" sizes="${manifest.sizes}" width="300" height="200"` +
          ' loading="lazy" decoding="async" style="max-width:100%;height:auto" alt="">',
        '</picture>',
      ].join('\n'),
    );
  });

  it('has rendered every entry: each URL is a cache hit with the listed ETag and size', async () => {
    for (const r of manifest.renditions) {
      const res = await t.app.inject({ method: 'GET', url: r.url });
      expect(res.statusCode).toBe(200);
      // Server-Timing (W3C Server Timing) carries the cache outcome as the "cache" metric.
      expect(res.headers['server-timing']).toMatch(/cache;desc="hit-/);
      expect(res.headers.etag).toBe(r.etag);
      expect(Number(res.headers['content-length'])).toBe(r.bytes);
      expect(res.headers['content-type']).toBe(`image/${r.format}`);
    }
  });

  it('does the work once: the same bytes again render and analyse nothing', async () => {
    const before = { renders: events.length, analyses };
    expect(before.renders).toBeGreaterThanOrEqual(8);
    const again = await upload(t.app, bytes, '?widths=80,160,240,400');
    expect(again.json()).toEqual(manifest);
    expect({ renders: events.length, analyses }).toEqual(before);
    // The same counts, as the Prometheus text format shows them (GET /metrics).
    const metrics = (await t.app.inject({ method: 'GET', url: '/metrics' })).body;
    expect(metrics).toMatch(new RegExp(`^foldwise_ingest_renditions_total\\{cache="miss"\\} ${before.renders}$`, 'm'));
    expect(metrics).toMatch(new RegExp(`^foldwise_ingest_analyses_total ${before.analyses}$`, 'm'));
  });

  it('joins concurrent uploads of the same new bytes into one analysis', async () => {
    const fresh = await png(120, 90, rampCode(120));
    const before = analyses;
    const [a, b] = await Promise.all([upload(t.app, fresh, '?formats=webp'), upload(t.app, fresh, '?formats=webp')]);
    expect(a.statusCode).toBe(200);
    expect(b.json()).toEqual(a.json());
    expect(analyses).toBe(before + 1);
    expect(a.json().renditions.map((r: any) => r.width)).toEqual([120]); // ladder capped at the source
  });
});

describe('POST /v1/ingest with JSON naming a source', () => {
  it('makes the manifest of a file already in the origin', async () => {
    const { writeFile, mkdir } = await import('node:fs/promises');
    await mkdir(join(t.sourceDir, 'fabrics'), { recursive: true });
    await writeFile(join(t.sourceDir, 'fabrics', 'ramp.png'), await png(200, 100, rampCode(200)));
    const res = await t.app.inject({
      method: 'POST',
      url: '/v1/ingest?widths=100,200&formats=png',
      payload: { source: 'fabrics/ramp.png' },
    });
    expect(res.statusCode).toBe(200);
    const m = res.json();
    expect(m.source).toEqual({ key: 'fabrics/ramp.png', width: 200, height: 100 });
    expect(m.srcset).toEqual({
      png: '/v1/renditions/fabrics/ramp.png?width=100&format=png 100w, /v1/renditions/fabrics/ramp.png?width=200&format=png 200w',
    });
  });
});

describe('POST /v1/ingest with an animated GIF', () => {
  it('says the source is animated; WebP renditions keep every frame, AVIF and JPEG show the first', async () => {
    const sharp = (await import('sharp')).default;
    const frames = 3;
    const data = new Uint8Array(120 * 80 * frames * 3).map((_, i) => 60 * Math.floor(i / (120 * 80 * 3)) + 40);
    const gif = await sharp(data, { raw: { width: 120, height: 80 * frames, channels: 3, pageHeight: 80 } }).gif({ delay: [100, 100, 100] }).toBuffer();
    const res = await upload(t.app, gif, '?widths=60,120&formats=webp,avif,jpeg');
    expect(res.statusCode).toBe(200);
    const m = res.json();
    expect(m.source).toMatchObject({ width: 120, height: 80, frames: 3 });
    for (const r of m.renditions) {
      const got = await t.app.inject({ url: r.url });
      const meta = await sharp(got.rawPayload).metadata();
      expect([r.format, meta.pages ?? 1, r.height]).toEqual([r.format, r.format === 'webp' ? 3 : 1, (r.width * 80) / 120]);
    }
  });
});
