import { existsSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import type { PixelRaster, Plan } from '../../src/core/types.js';
import { FoldwiseError } from '../../src/errors.js';
import { decodeImage } from '../../src/codec/decode.js';
import { probeSpooledDecode, type SpoolableSource, SpoolWriteError } from '../../src/codec/spool-decode.js';
import { RenderPool } from '../../src/pool/render-pool.js';

const limits = { maxPixels: 50_000_000, maxDimension: 10_000 };

/** Two crossed sinusoidal gratings and a slow ramp per channel, in [0, 1]: analytic content. */
function pattern(x: number, y: number, c: number): number {
  const g1 = Math.sin(2 * Math.PI * (0.071 * x + 0.029 * y + c / 3));
  const g2 = Math.cos(2 * Math.PI * (0.013 * x - 0.191 * y));
  return 0.5 + 0.25 * g1 + 0.15 * g2 + 0.08 * ((x + 2 * y + 50 * c) % 97) / 97 - 0.04;
}

function samples(width: number, height: number, channels: 1 | 3, depth: 8 | 16): Uint8Array | Uint16Array {
  const max = depth === 16 ? 65535 : 255;
  const data = depth === 16 ? new Uint16Array(width * height * channels) : new Uint8Array(width * height * channels);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) for (let c = 0; c < channels; c++) data[(y * width + x) * channels + c] = Math.round(max * pattern(x, y, c));
  }
  return data;
}

/** A source file made with sharp: JPEG (8-bit RGB) or PNG (8/16-bit, grey or RGB). */
async function source(format: 'jpeg' | 'png', width: number, height: number, channels: 1 | 3, depth: 8 | 16): Promise<Buffer> {
  let img = sharp(samples(width, height, channels, depth), { raw: { width, height, channels } });
  if (depth === 16) img = img.toColourspace(channels === 1 ? 'grey16' : 'rgb16');
  else if (channels === 1) img = img.toColourspace('b-w');
  return format === 'jpeg' ? img.jpeg({ quality: 90 }).toBuffer() : img.png().toBuffer();
}

const plan = (sw: number, sh: number, tw: number, th: number): Plan =>
  makePlan({ sourceWidth: sw, sourceHeight: sh, targetWidth: tw, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });

const bytes = (r: PixelRaster) => Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength);

describe('RenderPool.resampleSpooled (resample while libvips decodes)', () => {
  let pool: RenderPool;
  beforeAll(() => {
    pool = new RenderPool({ threads: 2, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto' });
  });
  afterAll(() => pool.close());

  /** The rendition made through the spool file, and through decodeImage + pool.resample. */
  async function both(bytesIn: Buffer, p: (w: number, h: number) => Plan): Promise<[PixelRaster, PixelRaster, SpoolableSource]> {
    const probe = await probeSpooledDecode(bytesIn, limits);
    expect(probe).not.toBeNull();
    const theirs = p(probe!.width, probe!.height);
    const path = pool.spool!.path();
    try {
      const written = probe!.write(path);
      const spooled = await pool.resampleSpooled(path, probe!, written, theirs);
      const decoded = await decodeImage(bytesIn, limits);
      const direct = await pool.resample(decoded.raster, theirs);
      return [spooled, direct, probe!];
    } finally {
      await pool.spool!.remove(path);
    }
  }

  it('spools under /dev/shm (memory-backed) where it exists, in a folder of its own', () => {
    expect(pool.spool).not.toBeNull();
    if (existsSync('/dev/shm')) expect(pool.spool!.dir.startsWith('/dev/shm/foldwise-spool-')).toBe(true);
    expect(existsSync(pool.spool!.dir)).toBe(true);
  });

  it.each([
    ['8-bit RGB JPEG', 'jpeg', 3, 8],
    ['8-bit grey PNG', 'png', 1, 8],
    ['16-bit RGB PNG', 'png', 3, 16],
    ['16-bit grey PNG', 'png', 1, 16],
  ] as const)('%s: the same bytes as decodeImage + resample, downscaled and upscaled', async (_name, format, channels, depth) => {
    const input = await source(format, 320, 240, channels, depth);
    for (const [tw, th] of [[100, 75], [64, 48], [411, 300]]) {
      const [spooled, direct, probe] = await both(input, (w, h) => plan(w, h, tw, th));
      expect([probe.channels, probe.depth]).toEqual([channels, depth]);
      expect(spooled.data).toBeInstanceOf(depth === 16 ? Uint16Array : Uint8Array);
      expect([spooled.width, spooled.height, spooled.channels]).toEqual([tw, th, channels]);
      expect(bytes(spooled).equals(bytes(direct))).toBe(true);
    }
  });

  it.each([
    ['8-bit RGB JPEG', 'jpeg', 3, 8],
    ['16-bit grey PNG', 'png', 1, 16],
  ] as const)('%s to an output big enough for two bands (>= 512x512): the same bytes', async (_name, format, channels, depth) => {
    const input = await source(format, 900, 800, channels, depth);
    const [spooled, direct] = await both(input, (w, h) => plan(w, h, 600, 540));
    expect(spooled.width * spooled.height).toBeGreaterThanOrEqual(512 * 512);
    expect(bytes(spooled).equals(bytes(direct))).toBe(true);
  });

  it('shrunk 4x or more (one band spooled, two in memory): the same bytes', async () => {
    // 1400x1100 -> 560x600: spooled, one worker keeps pace with the decode; in memory the
    // output is big enough for two bands. Noise, losslessly: every rounding shows.
    const raw = Buffer.alloc(1400 * 1100 * 3);
    for (let i = 0, s = 7; i < raw.length; i++) raw[i] = (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24;
    const input = await sharp(raw, { raw: { width: 1400, height: 1100, channels: 3 } }).png({ compressionLevel: 1 }).toBuffer();
    const [spooled, direct] = await both(input, (w, h) => plan(w, h, 560, 600));
    expect(bytes(spooled).equals(bytes(direct))).toBe(true);
  });

  it('a render that shrinks the area exactly 4x takes one worker, and the other renders meanwhile', async () => {
    const shape = { width: 1024, height: 1024, channels: 3 as const, depth: 8 as const };
    const raster = { data: new Uint8Array(1024 * 1024 * 3).map((_, i) => (i * 29) >> 5), ...shape };
    const theirs = plan(1024, 1024, 512, 512);
    const path = pool.spool!.path();
    let finish!: () => void;
    const written = new Promise<void>((resolve) => (finish = resolve));
    // Turns a deadlock (two bands waiting for rows that come only after the next render) into a failure.
    const render = pool.resampleSpooled(path, shape, written, theirs, AbortSignal.timeout(20_000));
    render.catch(() => undefined);
    try {
      const small = { data: new Uint8Array(64 * 48 * 3).fill(77), width: 64, height: 48, channels: 3 as const };
      const meanwhile = await pool.resample(small, plan(64, 48, 32, 24));
      await sharp(raster.data, { raw: { width: 1024, height: 1024, channels: 3 } }).toFile(path);
      finish();
      expect(meanwhile.data.every((v) => v === 77)).toBe(true);
      expect(bytes(await render).equals(bytes(await pool.resample(raster, theirs)))).toBe(true);
    } finally {
      await pool.spool!.remove(path);
    }
  }, 30_000);

  it("a truncated JPEG rejects with the decode's own code, and the pool renders on afterwards", async () => {
    const whole = await source('jpeg', 320, 240, 3, 8);
    const cut = whole.subarray(0, Math.floor(whole.length * 0.6));
    const expected = await decodeImage(cut, limits).catch((e: unknown) => e);
    expect(expected).toMatchObject({ code: 'ERR_SOURCE_CORRUPT' });
    // The header is intact, so the probe succeeds; the pixels fail while being written.
    const probe = await probeSpooledDecode(cut, limits);
    expect(probe).not.toBeNull();
    const path = pool.spool!.path();
    const failed = await pool.resampleSpooled(path, probe!, probe!.write(path), plan(320, 240, 100, 75)).catch((e: unknown) => e);
    await pool.spool!.remove(path);
    expect(failed).toBeInstanceOf(FoldwiseError);
    expect(failed).toMatchObject({ code: (expected as FoldwiseError).code, status: (expected as FoldwiseError).status });
    const [spooled, direct] = await both(whole, (w, h) => plan(w, h, 100, 75));
    expect(bytes(spooled).equals(bytes(direct))).toBe(true);
  });

  it("a failed render's band tasks are over when it rejects (none left queued behind busy workers)", async () => {
    // A render whose rows never arrive until released: its two bands hold both workers.
    const big = await source('jpeg', 900, 800, 3, 8);
    const slow = (await probeSpooledDecode(big, limits))!;
    const slowPath = pool.spool!.path();
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    const slowWritten = gate.then(() => slow.write(slowPath));
    const blocker = pool.resampleSpooled(slowPath, slow, slowWritten, plan(900, 800, 600, 540));
    // A corrupt source rendered meanwhile: its task waits for a worker; its decode fails.
    const cut = (await source('jpeg', 320, 240, 3, 8)).subarray(0, 4000);
    const probe = (await probeSpooledDecode(cut, limits))!;
    const path = pool.spool!.path();
    const written = probe.write(path);
    let queuedAtEnd = -1;
    const failed = pool.resampleSpooled(path, probe, written, plan(320, 240, 100, 75)).then(
      () => 'rendered',
      (e: unknown) => {
        queuedAtEnd = pool.queueDepth;
        return (e as FoldwiseError).code;
      },
    );
    await written.catch(() => undefined);
    release();
    await blocker;
    expect(await failed).toBe('ERR_SOURCE_CORRUPT');
    // Else each such failure leaves a task in piscina's bounded queue, after its admission
    // permit is released, and enough of them refuse the next renders' tasks.
    expect(queuedAtEnd).toBe(0);
    await Promise.all([pool.spool!.remove(slowPath), pool.spool!.remove(path)]);
  });

  it('a decode that fails after writing its last row is not rendered: its error comes back', async () => {
    const input = await source('jpeg', 96, 64, 3, 8);
    const probe = (await probeSpooledDecode(input, limits))!;
    const path = pool.spool!.path();
    try {
      await probe.write(path); // every row is in the file before the render starts
      let fail!: (e: unknown) => void;
      const written = new Promise<void>((_, reject) => (fail = reject));
      const late = new FoldwiseError('ERR_SOURCE_CORRUPT', 'broken after the last row');
      const render = pool.resampleSpooled(path, probe, written, plan(96, 64, 32, 20));
      render.catch(() => undefined);
      // A second render of the same file queues behind the first's band in the pool, so once it
      // is done the first one's bands and feed are done too; only then does the decode fail.
      await pool.resampleSpooled(path, probe, Promise.resolve(), plan(96, 64, 32, 20));
      fail(late);
      await expect(render).rejects.toBe(late);
    } finally {
      await pool.spool!.remove(path);
    }
  });

  it('a write into a folder that does not exist rejects with SpoolWriteError, also through resampleSpooled', async () => {
    const input = await source('png', 64, 48, 3, 8);
    const probe = (await probeSpooledDecode(input, limits))!;
    const nowhere = join(pool.spool!.dir, 'missing', 'x.v');
    await expect(probe.write(nowhere)).rejects.toBeInstanceOf(SpoolWriteError);
    const failed = await pool.resampleSpooled(nowhere, probe, probe.write(nowhere), plan(64, 48, 32, 24)).catch((e: unknown) => e);
    expect(failed).toBeInstanceOf(SpoolWriteError);
  });

  it('an RGBA PNG is not spooled (its opacity is known only after the last row)', async () => {
    const rgba = Buffer.alloc(40 * 30 * 4);
    for (let i = 0; i < 40 * 30; i++) rgba.set([200, 100, 50, i % 40 < 20 ? 255 : 0], i * 4);
    const png = await sharp(rgba, { raw: { width: 40, height: 30, channels: 4 } }).png().toBuffer();
    expect(await probeSpooledDecode(png, limits)).toBeNull();
  });
});

describe('RenderPool spool folder', () => {
  it('close() removes the spool folder', async () => {
    const pool = new RenderPool({ threads: 1, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto' });
    const dir = pool.spool!.dir;
    expect(existsSync(dir)).toBe(true);
    await pool.close();
    expect(existsSync(dir)).toBe(false);
  });

  it("spoolDir 'off' (and the default) spools nothing", async () => {
    for (const opts of [{ spoolDir: 'off' }, {}]) {
      const pool = new RenderPool({ threads: 1, maxQueue: 0, retryAfterSeconds: 1, ...opts });
      expect(pool.spool).toBeNull();
      await pool.close();
    }
  });
});
