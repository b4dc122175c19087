import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import { adaptiveFilter, analyzeSpectrum } from '../../src/core/risk/index.js';
import { decodeImage } from '../../src/codec/decode.js';
import { probeSpooledDecode } from '../../src/codec/spool-decode.js';
import { analyseTask } from '../../src/pool/analysis.js';
import { analysisCost } from '../../src/pool/cost.js';
import { RenderPool } from '../../src/pool/render-pool.js';
import { blockRows, WRITTEN } from '../../src/pool/spool/rows.js';
import { liveSpool } from '../../src/pool/spool/live.js';
import { planResponseOf } from '../../src/core/index.js';

const limits = { maxPixels: 50_000_000, maxDimension: 10_000 };
const W = 1100;
const H = 700;

/** A grating at 0.275 cycles/px along x (above the new Nyquist of a 2x reduction) and a slower one along y. */
async function gratingJpeg(): Promise<Buffer> {
  const raw = Buffer.alloc(W * H * 3);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const v = 0.5 + 0.3 * Math.cos(2 * Math.PI * 0.275 * x) + 0.15 * Math.sin(2 * Math.PI * 0.04 * y);
      raw.fill(Math.round(255 * v), (y * W + x) * 3, (y * W + x) * 3 + 3);
    }
  }
  return sharp(raw, { raw: { width: W, height: H, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}

const planFor = (tw: number, th: number) =>
  makePlan({ sourceWidth: W, sourceHeight: H, targetWidth: tw, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });

describe('the analysis in the pool (src/pool/analysis.ts)', () => {
  let dir: string;
  let jpeg: Buffer;
  let file: string;
  let state: SharedArrayBuffer;

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-analysis-'));
    jpeg = await gratingJpeg();
    file = join(dir, 'source.v');
    const probe = await probeSpooledDecode(jpeg, limits);
    await probe!.write(file);
    const s = new Int32Array(new SharedArrayBuffer(4));
    s[0] = WRITTEN;
    state = s.buffer as SharedArrayBuffer;
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  it('holds a tile\'s rows of a streamed source, nothing the size of the source', () => {
    // 14.7 MP RGB: 1 MiB holds 78 rows of 13296 bytes, fewer than a 128-row tile: 128 rows are held.
    const h = { width: 4432, height: 3324, channels: 3, bytesPerSample: 1 as const, hasAlpha: false, format: 'jpeg' };
    expect(blockRows({ width: 4432, height: 3324, channels: 3, depth: 8 })).toBe(78);
    expect(blockRows({ width: 4432, height: 3324, channels: 3, depth: 8 }, 128)).toBe(128);
    expect(analysisCost(h)).toBe(128 * 13296 + 128 * 128 * 3);
    expect(analysisCost(h)).toBeLessThan((4432 * 3324 * 3) / 20);
  });

  it('from a spool file wider than the reader\'s block: the same spectrum as the whole decoded raster', async () => {
    // 9000 px RGB: 38 rows in 1 MiB, so the reader's block is widened to the tile's 128.
    const w = 9000;
    const h = 300;
    const raw = Buffer.alloc(w * h * 3);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) raw.fill(Math.round(127.5 + 90 * Math.cos(2 * Math.PI * (0.31 * x + 0.07 * y))), (y * w + x) * 3, (y * w + x) * 3 + 3);
    const wide = await sharp(raw, { raw: { width: w, height: h, channels: 3 } }).jpeg({ quality: 90 }).toBuffer();
    const probe = await probeSpooledDecode(wide, limits);
    const path = join(dir, 'wide.v');
    await probe!.write(path);
    const { raster } = await decodeImage(wide, limits);
    const got = analyseTask({ src: { path, width: w, height: h, channels: 3, depth: 8, state } });
    expect(got.spectrum.tileSize).toBe(128);
    expect(got.spectrum).toEqual(analyzeSpectrum(raster));
  });

  it('from a spool file: the same spectrum and filter as the whole decoded raster gives', async () => {
    const { raster } = await decodeImage(jpeg, limits);
    const plan = planFor(550, 350);
    const whole = analyzeSpectrum(raster);
    const expected = adaptiveFilter(whole, plan, planResponseOf(plan));
    // The grating folds at 2x (sampling theorem, CHECKS.md): the filter lowers the x cut-off.
    expect(expected?.cutoff?.x).toBeLessThan(1);
    const got = analyseTask({ src: { path: file, width: W, height: H, channels: 3, depth: 8, state }, plan });
    expect(got.spectrum).toEqual(whole);
    expect(got.filter).toEqual(expected);
  });

  it('from a spool file still being written, in the pool: its tiles read as their rows arrive give the same spectrum and filter', async () => {
    const pool = new RenderPool({ threads: 2, maxQueue: 4, retryAfterSeconds: 1 });
    try {
      const { raster } = await decodeImage(jpeg, limits);
      const plan = planFor(550, 350);
      const probe = await probeSpooledDecode(jpeg, limits);
      const arriving = join(dir, 'arriving.v');
      // The task is queued before libvips has made the file: it waits for the file, then each row.
      const written = probe!.write(arriving);
      const live = liveSpool(arriving, probe!, written);
      const got = await pool.analyse(live.raster, plan);
      await written;
      expect(got.spectrum).toEqual(analyzeSpectrum(raster));
      expect(got.filter).toEqual(adaptiveFilter(got.spectrum, plan, planResponseOf(plan)));
      expect(got.filter?.cutoff?.x).toBeLessThan(1);
      // Called off before any row: the task ends (refused), it does not wait for a decode that never comes.
      const never = liveSpool(join(dir, 'never.v'), probe!, new Promise<void>(() => undefined));
      const waiting = pool.analyse(never.raster, plan);
      never.stop();
      await expect(waiting).rejects.toMatchObject({ code: 'ERR_RENDER_FAILED' });
    } finally {
      await pool.close();
    }
  });

  it('a wide-gamut source staged in shared memory keeps its primaries: luminance by the P3 coefficients', () => {
    // A red-only grating: its luminance weight differs between Rec. 709 and Display P3 primaries.
    const side = 256;
    const data = new Uint8Array(side * side * 3);
    for (let i = 0; i < side * side; i++) data[i * 3] = Math.round(127.5 + 100 * Math.cos(2 * Math.PI * 0.2 * (i % side)));
    const buffer = new SharedArrayBuffer(data.byteLength);
    new Uint8Array(buffer).set(data);
    const wide = { data, width: side, height: side, channels: 3 as const, gamut: 'display-p3' as const };
    const got = analyseTask({ src: { buffer, width: side, height: side, channels: 3, depth: 8, gamut: 'display-p3' } });
    expect(got.spectrum).toEqual(analyzeSpectrum(wide));
    expect(got.spectrum.power).not.toEqual(analyzeSpectrum({ data, width: side, height: side, channels: 3 }).power);
  });

  it('in the pool, from shared memory and from the spool file alike; warm() reaches every thread first', async () => {
    const pool = new RenderPool({ threads: 2, maxQueue: 4, retryAfterSeconds: 1 });
    try {
      expect(pool.warmed).toBe(false);
      await pool.warm();
      expect(pool.warmed).toBe(true);
      const { raster } = await decodeImage(jpeg, limits);
      const plan = planFor(550, 350);
      const fromFile = await pool.analyse({ path: file, width: W, height: H, channels: 3, depth: 8, state }, plan);
      const buffer = new SharedArrayBuffer(raster.data.byteLength);
      new Uint8Array(buffer).set(raster.data);
      const fromMemory = await pool.analyse({ buffer, width: W, height: H, channels: 3, depth: 8 }, plan);
      expect(fromFile.spectrum).toEqual(analyzeSpectrum(raster));
      expect(fromMemory).toEqual(fromFile);
      expect(await pool.adapt(fromFile.spectrum, plan)).toEqual(fromFile.filter);
      // A plan that shrinks nothing folds nothing (sampling theorem): no filter.
      expect(await pool.adapt(fromFile.spectrum, planFor(W, H))).toBeUndefined();
    } finally {
      await pool.close();
    }
  });
});
