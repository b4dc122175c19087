import { existsSync } from 'node:fs';
import { mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { gratingJpeg } from '../helpers/grating-jpeg.js';
import { STREAM_MIN_PIXELS } from '../../src/rendition/streamed.js';
import { grating, greyRaster } from '../core/risk/patterns.js';

const timing = (res: { headers: Record<string, unknown> }) => String(res.headers['server-timing']);
const stages = (res: { headers: Record<string, unknown> }) => [...timing(res).matchAll(/(?:^|, )([a-z]+);/g)].map((m) => m[1]);
const cacheOf = (res: { headers: Record<string, unknown> }) => /cache;desc="([^"]+)"/.exec(timing(res))?.[1];

/** The app's count of cache lookups with this result ('miss', 'hit-memory', ...). */
async function lookups(t: TestApp, result: string): Promise<number> {
  const { values } = await t.app.metrics.cacheLookups.get();
  return values.find((v) => v.labels.result === result)?.value ?? 0;
}

// Sources under STREAM_MIN_PIXELS (1 MP) keep the in-memory path; these are just above it.
const W = 1280;
const H = 820;

describe('GET /v1/renditions: resampled while the source decodes (spooled)', () => {
  let t: TestApp;
  let off: TestApp;
  let jpeg: Buffer;
  const get = (app: TestApp, name: string, q: string) => app.app.inject({ url: `/v1/renditions/${name}?${q}` });

  beforeAll(async () => {
    [t, off] = await Promise.all([build(), build({ config: { pool: { spoolDir: 'off' } } })]);
    expect(W * H).toBeGreaterThanOrEqual(STREAM_MIN_PIXELS);
    jpeg = await gratingJpeg(W, H);
    // A grating at 0.275 cycles/px: just above the new Nyquist (0.25) of a 2x downscale, which
    // the planned filter alone would fold (sampling theorem, CHECKS.md), so prefilter=auto raises
    // sigma; also at 620 px wide (new Nyquist 0.242).
    const g = greyRaster(W, H, grating(0.275), 8);
    const near = await sharp(g.data as Uint8Array, { raw: { width: W, height: H, channels: 1 } }).png().toBuffer();
    for (const app of [t, off]) {
      await writeFile(`${app.sourceDir}/grating.jpg`, jpeg);
      await writeFile(`${app.sourceDir}/plain.jpg`, jpeg);
      await writeFile(`${app.sourceDir}/cut.jpg`, jpeg.subarray(0, Math.floor(jpeg.length * 0.6)));
      await writeFile(`${app.sourceDir}/near.png`, near);
      await writePng(app.sourceDir, 'cutout.png', W, H, 4, (x, y) => [200, (x * 3) % 256, (y * 5) % 256, x < W / 2 ? 255 : 0]);
    }
  });
  afterAll(() => Promise.all([t.close(), off.close()]));

  it('spooling is on by default and off when configured', () => {
    expect(t.app.renderPool.spool?.dir).toMatch(/foldwise-spool-\d+-/);
    expect(off.app.renderPool.spool).toBeNull();
  });

  it('prefilter=auto: the first rendition of a new source streams too, with the bytes of the decode-then-resample service', async () => {
    const first = await get(t, 'grating.jpg', 'width=120&format=png');
    expect(first.statusCode).toBe(200);
    // The analysis (in the pool, after the decode) left the plan as it was: no second resample.
    expect(stages(first)).toContain('stream');
    expect(stages(first)).not.toContain('resample');
    expect(String(first.headers['rendition-plan'])).toContain('cutoff=1.00,1.00');
    const ref = await get(off, 'grating.jpg', 'width=120&format=png');
    expect(stages(ref)).toContain('resample');
    expect(first.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
    expect(first.rawPayload.equals(ref.rawPayload)).toBe(true);
    const second = await get(t, 'grating.jpg', 'width=100&format=png');
    expect(stages(second)).toContain('stream');
    expect(stages(second)).not.toContain('resample');
    const ref2 = await get(off, 'grating.jpg', 'width=100&format=png');
    expect(second.headers['rendition-plan']).toBe(ref2.headers['rendition-plan']);
    expect(second.rawPayload.equals(ref2.rawPayload)).toBe(true);
  });

  it('two first requests of a new source at once (other widths): one analysis, both with the bytes of the decode-then-resample service', async () => {
    for (const app of [t, off]) await writeFile(`${app.sourceDir}/twin.jpg`, jpeg);
    const before = t.app.spectra.analyses;
    const [a, b] = await Promise.all([get(t, 'twin.jpg', 'width=120&format=png'), get(t, 'twin.jpg', 'width=90&format=png')]);
    expect([a.statusCode, b.statusCode]).toEqual([200, 200]);
    expect(stages(a)).toContain('stream');
    expect(stages(b)).toContain('stream');
    expect(t.app.spectra.analyses - before).toBe(1);
    for (const [res, q] of [[a, 'width=120&format=png'], [b, 'width=90&format=png']] as const) {
      const ref = await get(off, 'twin.jpg', q);
      expect(res.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
      expect(res.rawPayload.equals(ref.rawPayload)).toBe(true);
    }
  });

  it('prefilter=auto on a new source whose spectrum lowers the cut-off: resampled again from the spool file with it; so is a further width (decided from the kept spectrum while the kernel plan streams)', async () => {
    const first = await get(t, 'near.png', 'width=640&format=png');
    expect(stages(first)).toContain('stream');
    expect(stages(first)).toContain('resample');
    const ref1 = await get(off, 'near.png', 'width=640&format=png');
    expect(first.headers['rendition-plan']).toBe(ref1.headers['rendition-plan']);
    expect(first.rawPayload.equals(ref1.rawPayload)).toBe(true);
    const analyses = t.app.spectra.analyses;
    const second = await get(t, 'near.png', 'width=620&format=png');
    expect(stages(second)).toContain('stream');
    expect(stages(second)).toContain('resample');
    expect(t.app.spectra.analyses).toBe(analyses);
    const cutoff = /cutoff=([\d.]+),([\d.]+)/.exec(String(second.headers['rendition-plan']));
    expect(Math.min(Number(cutoff?.[1]), Number(cutoff?.[2]))).toBeLessThan(1);
    expect(String(second.headers['rendition-plan'])).not.toBe(String((await get(t, 'near.png', 'width=620&format=png&prefilter=none')).headers['rendition-plan']));
    const ref = await get(off, 'near.png', 'width=620&format=png');
    expect(second.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
    expect(second.rawPayload.equals(ref.rawPayload)).toBe(true);
  });

  it('a restarted process finds the spectrum in the disk tier: a further width gets the adapted plan, analysing nothing', async () => {
    // near.png was analysed above; a new process over the same cache folder.
    await t.app.spectra.settled();
    const again = await build({ sourceDir: t.sourceDir, config: { cache: { dir: t.cacheDir } } });
    try {
      const res = await get(again, 'near.png', 'width=600&format=png');
      expect(stages(res)).toContain('stream');
      expect(stages(res)).toContain('resample');
      expect(again.app.spectra.analyses).toBe(0);
      expect(String(res.headers['rendition-plan'])).toMatch(/prefilter=[a-z,]*content/);
      const ref = await get(off, 'near.png', 'width=600&format=png');
      expect(res.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
      expect(res.rawPayload.equals(ref.rawPayload)).toBe(true);
    } finally {
      await again.close();
    }
  });

  it('prefilter=none streams from the first rendition, with the bytes of the unspooled service', async () => {
    for (const q of ['width=120&prefilter=none&format=png', 'width=96&height=96&prefilter=none&format=jpeg']) {
      const res = await get(t, 'plain.jpg', q);
      expect(res.statusCode).toBe(200);
      expect(stages(res)).toContain('stream');
      expect(stages(res)).not.toContain('resample');
      const ref = await get(off, 'plain.jpg', q);
      expect(stages(ref)).not.toContain('stream');
      expect(res.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
      expect(res.headers['content-type']).toBe(ref.headers['content-type']);
      expect(res.rawPayload.equals(ref.rawPayload)).toBe(true);
    }
  });

  it('a PNG with alpha never streams', async () => {
    for (const q of ['width=50&prefilter=none&format=png', 'width=60&format=png', 'width=50&format=png']) {
      const res = await get(t, 'cutout.png', q);
      expect(res.statusCode).toBe(200);
      expect(stages(res)).toContain('resample');
      expect(stages(res)).not.toContain('stream');
    }
  });

  it('a truncated JPEG gives the problem the unspooled service gives, and is not cached', async () => {
    const ref = await get(off, 'cut.jpg', 'width=100&prefilter=none');
    expect(ref.statusCode).toBeGreaterThanOrEqual(400);
    expect(ref.headers['content-type']).toMatch(/^application\/problem\+json/);
    for (let i = 0; i < 2; i++) {
      const misses = await lookups(t, 'miss');
      const res = await get(t, 'cut.jpg', 'width=100&prefilter=none');
      expect(res.statusCode).toBe(ref.statusCode);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(res.json()).toMatchObject({ status: ref.statusCode, code: ref.json().code });
      // Each request looked the rendition up and missed: the failure was not stored.
      expect(await lookups(t, 'miss')).toBe(misses + 1);
    }
    expect(ref.json().code).toBe('ERR_SOURCE_CORRUPT');
  });

  it('leaves no spool file behind, after streamed renders and failed ones', async () => {
    const [ok, bad] = await Promise.all([get(t, 'plain.jpg', 'width=77&prefilter=none'), get(t, 'cut.jpg', 'width=77&prefilter=none')]);
    expect([ok.statusCode, bad.statusCode]).toEqual([200, 422]);
    expect(stages(ok)).toContain('stream');
    expect(await readdir(t.app.renderPool.spool!.dir)).toEqual([]);
  });
});

describe('GET /v1/renditions when the spool folder cannot be written', () => {
  let t: TestApp;
  let off: TestApp;
  beforeAll(async () => {
    // A folder path: the pool makes its own folder inside it (SpoolDir.open, mkdtemp).
    const base = await mkdtemp(join(tmpdir(), 'fw-spool-base-'));
    t = await build({ config: { pool: { spoolDir: base } } });
    off = await build({ config: { pool: { spoolDir: 'off' } } });
    const jpeg = await gratingJpeg(W, H);
    await writeFile(`${t.sourceDir}/g.jpg`, jpeg);
    await writeFile(`${off.sourceDir}/g.jpg`, jpeg);
    const spool = t.app.renderPool.spool!;
    expect(spool.dir.startsWith(join(base, 'foldwise-spool-'))).toBe(true);
    await rm(spool.dir, { recursive: true, force: true });
    expect(existsSync(spool.dir)).toBe(false);
    await rm(base, { recursive: true, force: true });
  });
  afterAll(() => Promise.all([t.close(), off.close()]));

  // The stream is tried (a big enough source, prefilter=none), its spool write fails, and the
  // render starts over in memory.
  it('falls back to decoding in memory: the rendition succeeds, resampled after the decode, with the same bytes', async () => {
    expect(t.app.renderPool.spool).not.toBeNull();
    const res = await t.app.inject({ url: '/v1/renditions/g.jpg?width=80&prefilter=none&format=png' });
    expect(res.statusCode).toBe(200);
    expect(stages(res)).toContain('resample');
    const ref = await off.app.inject({ url: '/v1/renditions/g.jpg?width=80&prefilter=none&format=png' });
    expect(res.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
    expect(res.rawPayload.equals(ref.rawPayload)).toBe(true);
    const again = await t.app.inject({ url: '/v1/renditions/g.jpg?width=80&prefilter=none&format=png' });
    expect(cacheOf(again)).toBe('hit-memory');
  });
});
