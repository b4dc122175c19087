/**
 * cache.decodedBytes: a finished decode's spool file is kept for the next rendition of the same
 * source version, which then resamples it with no decode, with the bytes a fresh decode gives.
 */
import { readdir, rm, utimes, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { gratingJpeg } from '../helpers/grating-jpeg.js';
import { at, pixels } from '../helpers/images.js';
import { grating, greyRaster } from '../core/risk/patterns.js';

const stages = (res: { headers: Record<string, unknown> }) => [...String(res.headers['server-timing']).matchAll(/(?:^|, )([a-z]+);/g)].map((m) => m[1]);
const get = (app: TestApp, name: string, q: string) => app.app.inject({ url: `/v1/renditions/${name}?${q}` });
const key = 'a signing key for the weaving shop';

// Above STREAM_MIN_PIXELS (1 MP), so the decodes are spooled; 3,148,800 bytes decoded.
const W = 1280;
const H = 820;

async function keptFiles(t: TestApp): Promise<string[]> {
  await t.app.renderContext.keptDecodes?.settled();
  return readdir(t.app.renderPool.spool!.dir);
}

async function keptGauge(t: TestApp): Promise<number> {
  const m = /^foldwise_decoded_bytes_kept (\d+)$/m.exec((await t.app.inject({ url: '/metrics' })).body);
  return Number(m?.[1]);
}

/**
 * Runs `fn` with a two-thread service keeping decodes and the in-memory service, both holding
 * the grating JPEG as `name`; both are closed after.
 */
async function withKeptAndOff(name: string, fn: (t: TestApp, off: TestApp) => Promise<void>): Promise<void> {
  const [t, off] = await Promise.all([build({ config: { cache: { decodedBytes: 16 * 2 ** 20 }, pool: { threads: 2 } } }), build()]);
  try {
    const jpeg = await gratingJpeg(W, H);
    for (const app of [t, off]) await writeFile(`${app.sourceDir}/${name}`, jpeg);
    await fn(t, off);
  } finally {
    await Promise.all([t.close(), off.close()]);
  }
}

/** Asserts that `res` has the plan and the bytes `off` (a service keeping no decode) answers for `name` and `q`. */
async function expectAsOff(off: TestApp, name: string, q: string, res: { headers: Record<string, unknown>; rawPayload: Buffer }): Promise<void> {
  const ref = await get(off, name, q);
  expect(res.headers['rendition-plan']).toBe(ref.headers['rendition-plan']);
  expect(res.rawPayload.equals(ref.rawPayload)).toBe(true);
}

/** Resolves once `name`'s default decode is in progress on `t` (polled on setImmediate: events, not time). */
async function untilDecoding(t: TestApp, name: string): Promise<void> {
  const ids = await t.app.origin.identify(name);
  const of = { key: ids.key, version: ids.version, wish: 'source 0' };
  while (!t.app.renderContext.keptDecodes!.decoding(of)) await new Promise((r) => setImmediate(r));
}

describe('kept decodes: further renditions of a large picture skip its decode', () => {
  let t: TestApp;
  let off: TestApp;
  beforeAll(async () => {
    [t, off] = await Promise.all([
      build({ config: { cache: { decodedBytes: 16 * 2 ** 20 }, signing: { keys: [key], required: false } } }),
      build({ config: { pool: { spoolDir: 'off' } } }),
    ]);
    const jpeg = await gratingJpeg(W, H);
    // A grating just above a 2x downscale's new Nyquist: prefilter=auto lowers the cut-off (see renditions-streamed.test.ts).
    const g = greyRaster(W, H, grating(0.275), 8);
    const near = await sharp(g.data as Uint8Array, { raw: { width: W, height: H, channels: 1 } }).png().toBuffer();
    for (const app of [t, off]) {
      await writeFile(`${app.sourceDir}/twill.jpg`, jpeg);
      await writeFile(`${app.sourceDir}/near.png`, near);
    }
  });
  afterAll(() => Promise.all([t.close(), off.close()]));

  it('further widths and formats read the kept decode, with the bytes of the unspooled service', async () => {
    const first = await get(t, 'twill.jpg', 'width=120&format=png');
    expect(first.statusCode).toBe(200);
    expect(stages(first)).toEqual(expect.arrayContaining(['decode', 'stream']));
    for (const q of ['width=100&format=png', 'width=96&height=96&prefilter=none&format=jpeg', 'width=400&format=webp']) {
      const res = await get(t, 'twill.jpg', q);
      expect(res.statusCode).toBe(200);
      // Resampled from the finished file: nothing overlapped a decode.
      expect(stages(res)).toContain('resample');
      expect(stages(res)).not.toContain('stream');
      await expectAsOff(off, 'twill.jpg', q, res);
    }
    expect(await keptGauge(t)).toBe(W * H * 3);
    expect(await keptFiles(t)).toHaveLength(1);
  });

  it('prefilter=auto whose spectrum lowers the cut-off: the adapted plan is resampled from the kept decode too', async () => {
    expect(stages(await get(t, 'near.png', 'width=640&format=png'))).toContain('stream');
    const res = await get(t, 'near.png', 'width=620&format=png');
    expect(stages(res)).not.toContain('stream');
    // Decided first (from the kept spectrum), then rendered once with the adapted plan.
    expect(stages(res).indexOf('plan')).toBeGreaterThan(0);
    expect(stages(res).indexOf('plan')).toBeLessThan(stages(res).indexOf('resample'));
    expect(String(res.headers['rendition-plan'])).toMatch(/prefilter=[a-z,]*content/);
    await expectAsOff(off, 'near.png', 'width=620&format=png', res);
    // Two sources kept (near.png's decode too is three bytes a pixel).
    expect(await keptGauge(t)).toBe(2 * W * H * 3);
  });

  it('another decode wish (gamut=srgb) is decoded on its own', async () => {
    const res = await get(t, 'twill.jpg', 'width=110&format=png&gamut=srgb');
    expect(res.statusCode).toBe(200);
    expect(stages(res)).toContain('stream');
  });

  it('a source replaced on disk is decoded again, its renditions show the new pixels, and the old file goes', async () => {
    const flat = await sharp({ create: { width: W, height: H, channels: 3, background: { r: 30, g: 90, b: 200 } } }).jpeg({ quality: 95 }).toBuffer();
    await writeFile(join(t.sourceDir, 'twill.jpg'), flat);
    await utimes(join(t.sourceDir, 'twill.jpg'), new Date(), new Date(Date.now() + 5000));
    const res = await get(t, 'twill.jpg', 'width=90&format=png');
    expect(stages(res)).toContain('stream');
    const img = await pixels(res.rawPayload);
    for (const [c, want] of at(img, 45, 20).map((v, i) => [v, [30, 90, 200][i]])) expect(Math.abs(c - want)).toBeLessThanOrEqual(3);
    expect(await keptFiles(t)).toHaveLength(2);
  });

  it("a deleted source's kept decode goes with it", async () => {
    const before = await keptGauge(t);
    const del = await t.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/near.png', {}, key) });
    expect(del.statusCode).toBe(200);
    expect(await keptGauge(t)).toBe(before - W * H * 3);
    expect(await keptFiles(t)).toHaveLength(1);
  });

  it('a kept file gone from the folder (removed by hand) is let go, and the rendition decodes the source again', async () => {
    // twill.jpg's (the flat blue one) is the only file left.
    const [file] = await keptFiles(t);
    await rm(join(t.app.renderPool.spool!.dir, file));
    const res = await get(t, 'twill.jpg', 'width=70&format=png');
    expect(res.statusCode).toBe(200);
    expect(stages(res)).toContain('stream');
    const img = await pixels(res.rawPayload);
    for (const [c, want] of at(img, 35, 20).map((v, i) => [v, [30, 90, 200][i]])) expect(Math.abs(c - want)).toBeLessThanOrEqual(3);
    // The new decode is kept in its place.
    expect(await keptFiles(t)).toHaveLength(1);
    expect((await keptFiles(t))[0]).not.toBe(file);
    expect(await keptGauge(t)).toBe(W * H * 3);
  });
});

describe('a kept file gone from the folder', () => {
  // With two threads a band renders beside the decision: it fails at once on the missing file
  // while the decision still runs (from the kept spectrum, or by analysing the file, which fails too).
  it.each([[1, 'gone too'], [2, 'gone too'], [2, 'kept']] as const)('%i thread(s), its spectrum %s: the rendition falls back and decodes the source again', async (threads, spectrum) => {
    // No disk tier: the spectrum lives in memory only, so forgetting it leaves an analysis to do.
    const t = await build({ config: { cache: { decodedBytes: 16 * 2 ** 20, diskBytes: 0 }, pool: { threads } } });
    try {
      await writeFile(`${t.sourceDir}/brick.jpg`, await gratingJpeg(W, H));
      expect(stages(await get(t, 'brick.jpg', 'width=300&format=png'))).toContain('stream');
      const [file] = await keptFiles(t);
      await rm(join(t.app.renderPool.spool!.dir, file));
      if (spectrum === 'gone too') t.app.spectra.forget('brick.jpg');
      const res = await get(t, 'brick.jpg', 'width=280&format=png');
      expect(res.statusCode).toBe(200);
      expect(stages(res)).toContain('stream');
      expect(t.app.spectra.analyses).toBe(spectrum === 'gone too' ? 2 : 1);
      // The new decode is kept in the old one's place.
      expect(await keptFiles(t)).toHaveLength(1);
      expect((await keptFiles(t))[0]).not.toBe(file);
    } finally {
      await t.close();
    }
  });
});

describe('the alias-risk report of a new source keeps its decode for the renditions that follow', () => {
  it('one analysis, the report of the in-memory service, and renditions with no decode and its bytes', async () => {
    const [t, off] = await Promise.all([build({ config: { cache: { decodedBytes: 16 * 2 ** 20 } } }), build()]);
    try {
      const jpeg = await gratingJpeg(W, H);
      for (const app of [t, off]) await writeFile(`${app.sourceDir}/herringbone.jpg`, jpeg);
      const report = await t.app.inject({ url: '/v1/alias-risk/herringbone.jpg?width=300' });
      expect(report.statusCode).toBe(200);
      // off (cache.decodedBytes 0) decodes in memory and analyses the raster: the same spectrum, so the same report.
      const ref = await off.app.inject({ url: '/v1/alias-risk/herringbone.jpg?width=300' });
      expect(report.json()).toEqual(ref.json());
      expect(await keptFiles(t)).toHaveLength(1);
      expect(await keptFiles(off)).toEqual([]);
      for (const q of ['width=300&format=png', 'width=640&format=png']) {
        const res = await get(t, 'herringbone.jpg', q);
        expect(stages(res)).toContain('resample');
        expect(stages(res)).not.toContain('stream');
        await expectAsOff(off, 'herringbone.jpg', q, res);
      }
      expect(t.app.spectra.analyses).toBe(1);
    } finally {
      await Promise.all([t.close(), off.close()]);
    }
  });
});

describe('a rendition asked while the alias-risk report decodes its new source', () => {
  it('waits for the report\'s decode and resamples it: one decode, one analysis, the bytes of the unspooled service', async () => {
    await withKeptAndOff('pinstripe.jpg', async (t, off) => {
      const report = t.app.inject({ url: '/v1/alias-risk/pinstripe.jpg?width=300' });
      await untilDecoding(t, 'pinstripe.jpg');
      const res = await get(t, 'pinstripe.jpg', 'width=300&format=png');
      expect((await report).statusCode).toBe(200);
      expect(res.statusCode).toBe(200);
      expect(stages(res)).toContain('resample');
      expect(stages(res)).not.toContain('stream');
      expect(t.app.spectra.analyses).toBe(1);
      await expectAsOff(off, 'pinstripe.jpg', 'width=300&format=png', res);
    });
  });
});

describe('decodes not kept', () => {
  for (const [what, decodedBytes] of [['with cache.decodedBytes 0', 0], ['a decode over half of cache.decodedBytes', 4 * 2 ** 20]] as const) {
    it(`${what}: every width decodes, and no spool file stays`, async () => {
      const t = await build({ config: { cache: { decodedBytes } } });
      try {
        await writeFile(`${t.sourceDir}/twill.jpg`, await gratingJpeg(W, H));
        for (const width of [120, 100]) {
          const res = await get(t, 'twill.jpg', `width=${width}&format=png`);
          expect(res.statusCode).toBe(200);
          expect(stages(res)).toContain('stream');
        }
        expect(await keptFiles(t)).toEqual([]);
        expect(await keptGauge(t)).toBe(0);
      } finally {
        await t.close();
      }
    });
  }
});

describe('with two threads', () => {
  it('a kept decode is resampled in two bands from the start, or in one beside the decision, with the bytes of the unspooled service', async () => {
    await withKeptAndOff('twill.jpg', async (t, off) => {
      expect(stages(await get(t, 'twill.jpg', 'width=300&format=png'))).toContain('stream');
      // prefilter=none: two bands from the start. prefilter=auto: one band beside the decision
      // (from the kept spectrum), which at 1000 px lowers the cut-off (the band is called off
      // and the adapted plan rendered) and at 120 px keeps the kernel's plan (the band's rest
      // is handed over).
      const cases = [['width=1000&format=png', 'adapted'], ['width=1000&prefilter=none&format=png', 'none asked'], ['width=120&format=png', 'kept']] as const;
      for (const [q, decision] of cases) {
        const res = await get(t, 'twill.jpg', q);
        expect(stages(res)).not.toContain('stream');
        expect(stages(res).includes('plan')).toBe(decision !== 'none asked');
        expect(/prefilter=[a-z,]*content/.test(String(res.headers['rendition-plan']))).toBe(decision === 'adapted');
        await expectAsOff(off, 'twill.jpg', q, res);
      }
    });
  });
});

describe('renditions of a new source asked at once', () => {
  it('decode it once: the others wait for its kept decode, with the bytes of the unspooled service', async () => {
    await withKeptAndOff('gingham.jpg', async (t, off) => {
      const qs = ['width=300&format=png', 'width=200&format=png', 'width=640&prefilter=none&format=png'];
      const answers = await Promise.all(qs.map((q) => get(t, 'gingham.jpg', q)));
      expect(answers.map((r) => r.statusCode)).toEqual([200, 200, 200]);
      // One streamed (it decoded), the others resampled its kept file.
      expect(answers.filter((r) => stages(r).includes('stream'))).toHaveLength(1);
      expect(answers.filter((r) => !stages(r).includes('stream') && stages(r).includes('resample'))).toHaveLength(2);
      for (const [i, q] of qs.entries()) await expectAsOff(off, 'gingham.jpg', q, answers[i]);
      expect(t.app.spectra.analyses).toBe(1);
      expect(await keptFiles(t)).toHaveLength(1);
    });
  });

  it('a waiting rendition whose client goes away stops waiting, and the decode it waited for is kept', async () => {
    const t = await build({ config: { cache: { decodedBytes: 16 * 2 ** 20 }, pool: { threads: 2 } } });
    try {
      await writeFile(`${t.sourceDir}/twill.jpg`, await gratingJpeg(W, H));
      const kept = t.app.renderContext.keptDecodes!;
      const first = get(t, 'twill.jpg', 'width=300&format=png');
      await untilDecoding(t, 'twill.jpg');
      const gone = new AbortController();
      const { renderRendition } = await import('../../src/rendition/service.js');
      const { compileRenditionQuery } = await import('../../src/schemas/rendition.js');
      const { kernelNames } = await import('../../src/core/index.js');
      const query = compileRenditionQuery({ maxDimension: 16384, kernelNames }).parse({ width: '200', format: 'png' });
      // Told when the second rendition finds the first's decode in progress: it is about to wait for it.
      const found = new Promise<void>((resolve) => {
        const decoding = kept.decoding.bind(kept);
        kept.decoding = (o) => {
          const p = decoding(o);
          if (p) resolve();
          return p;
        };
      });
      const waiting = renderRendition({ ...t.app.renderContext, signal: gone.signal }, 'twill.jpg', query);
      await found;
      gone.abort(new Error('the client went away'));
      await expect(waiting).rejects.toThrow('the client went away');
      expect((await first).statusCode).toBe(200);
      expect(await keptFiles(t)).toHaveLength(1);
    } finally {
      await t.close();
    }
  });
});
