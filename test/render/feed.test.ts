import { appendFile, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FED, FEED_FAILED, FEEDING, feedFromSpool, type FeedShape, headerMismatch } from '../../src/render/feed.js';

let dir: string;
let serial = 0;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-feed-'));
});
afterAll(() => rm(dir, { recursive: true, force: true }));

/** Seeded noise samples (a linear congruential generator). */
function noise(length: number, deep: boolean, seed: number): Uint8Array | Uint16Array {
  const data = deep ? new Uint16Array(length) : new Uint8Array(length);
  let s = seed >>> 0;
  for (let i = 0; i < length; i++) {
    s = (s * 1664525 + 1013904223) >>> 0;
    data[i] = deep ? s >>> 16 : s >>> 24;
  }
  return data;
}

const asBytes = (a: Uint8Array | Uint16Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

/**
 * libvips' own '.v' file of `samples` (sharp picks the format from the name), and its bytes.
 * 16-bit samples go through grey16 / rgb16 so libvips keeps them unsigned 16-bit.
 */
async function vipsFile(shape: FeedShape, samples: Uint8Array | Uint16Array): Promise<{ path: string; file: Buffer }> {
  const path = join(dir, `f${serial++}.v`);
  const channels = shape.channels as 1 | 3;
  let img = sharp(samples, { raw: { width: shape.width, height: shape.height, channels } });
  if (shape.depth === 16) img = img.toColourspace(channels === 1 ? 'grey16' : 'rgb16');
  await img.toFile(path);
  return { path, file: await readFile(path) };
}

/** A promise with its settle functions, standing for the writer (spool-decode.ts write). */
function writer() {
  let resolve!: () => void;
  let reject!: (e: unknown) => void;
  const written = new Promise<void>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { written, resolve, reject };
}

/** Atomics.waitAsync (ES2024; Node 20 has it, this project's TypeScript lib does not declare it). */
const waitAsync = (Atomics as unknown as {
  waitAsync(a: Int32Array, i: number, v: number): { async: boolean; value: Promise<'ok' | 'timed-out'> | 'not-equal' | 'timed-out' };
}).waitAsync;

/** Resolves once progress[1] (rows ready) reaches `rows`; woken by the feed's Atomics.notify. */
async function rowsReached(progress: SharedArrayBuffer, rows: number): Promise<number> {
  const p = new Int32Array(progress);
  for (;;) {
    const ready = Atomics.load(p, 1);
    if (ready >= rows) return ready;
    if (Atomics.load(p, 0) === FEED_FAILED) throw new Error('the feed failed');
    const w = waitAsync(p, 1, ready);
    if (w.async) await w.value;
  }
}

const state = (progress: SharedArrayBuffer) => Array.from(new Int32Array(progress));

const rgb8: FeedShape = { width: 37, height: 23, channels: 3, depth: 8 };
const grey16: FeedShape = { width: 29, height: 17, channels: 1, depth: 16 };
const size = (s: FeedShape) => s.width * s.height * s.channels * (s.depth / 8);
const rowBytes = (s: FeedShape) => s.width * s.channels * (s.depth / 8);

describe('headerMismatch (libvips vips.c, vips__read_header_bytes: 64-byte header, little-endian fields)', () => {
  it('accepts the header libvips wrote for exactly that shape, 8-bit RGB and 16-bit grey', async () => {
    for (const [shape, seed] of [[rgb8, 1], [grey16, 2]] as const) {
      const { file } = await vipsFile(shape, noise(size(shape) / (shape.depth / 8), shape.depth === 16, seed));
      expect(headerMismatch(file.subarray(0, 64), shape)).toBeNull();
    }
  });

  it('names a wrong size, band count or depth', async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 3));
    const head = file.subarray(0, 64);
    expect(headerMismatch(head, { ...rgb8, width: 36 })).toMatch(/37x23, not 36x23/);
    expect(headerMismatch(head, { ...rgb8, height: 24 })).toMatch(/37x23, not 37x24/);
    expect(headerMismatch(head, { ...rgb8, channels: 1 })).toMatch(/3 bands, not 1/);
    expect(headerMismatch(head, { ...rgb8, depth: 16 })).toMatch(/not 16-bit unsigned/);
    const { file: deep } = await vipsFile(grey16, noise(size(grey16) / 2, true, 4));
    expect(headerMismatch(deep.subarray(0, 64), { ...grey16, depth: 8 })).toMatch(/not 8-bit unsigned/);
  });

  it('refuses a coded image (coding field, byte 24, not 0 = none)', async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 5));
    const head = Buffer.from(file.subarray(0, 64));
    head.writeInt32LE(2, 24); // VIPS_CODING_LABQ (from memory)
    expect(headerMismatch(head, rgb8)).toMatch(/not 8-bit unsigned/);
  });

  it('refuses bytes that are not a libvips image file, or a header cut short', async () => {
    const png = await sharp(noise(size(rgb8), false, 6), { raw: { width: 37, height: 23, channels: 3 } }).png().toBuffer();
    expect(headerMismatch(png.subarray(0, 64), rgb8)).toBe('not a libvips image file');
    expect(headerMismatch(new Uint8Array(64), rgb8)).toBe('not a libvips image file');
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 7));
    expect(headerMismatch(file.subarray(0, 40), rgb8)).toBe('not a libvips image file');
  });
});

describe('feedFromSpool', () => {
  it.each([['8-bit RGB', rgb8, 11], ['16-bit grey', grey16, 12]] as const)('copies a complete %s file exactly and ends [FED, height]', async (_n, shape, seed) => {
    const samples = noise(size(shape) / (shape.depth / 8), shape.depth === 16, seed);
    const { path } = await vipsFile(shape, samples);
    // A reused staging buffer can be longer than the raster: the rest stays as it was.
    const target = new SharedArrayBuffer(size(shape) + 100);
    new Uint8Array(target).fill(0xa5);
    const feed = feedFromSpool(path, shape, target, Promise.resolve());
    await feed.done;
    expect(Buffer.from(target, 0, size(shape)).equals(asBytes(samples))).toBe(true);
    expect(new Uint8Array(target, size(shape)).every((b) => b === 0xa5)).toBe(true);
    expect(state(feed.progress)).toEqual([FED, shape.height]);
  });

  it('follows a file that is made late and grows in pieces, publishing whole rows only', async () => {
    const samples = noise(size(rgb8), false, 13);
    const { file } = await vipsFile(rgb8, samples);
    const path = join(dir, `grow${serial++}.v`);
    const w = writer();
    const target = new SharedArrayBuffer(size(rgb8));
    // Started before the file exists (the decoder has not made it yet).
    const feed = feedFromSpool(path, rgb8, target, w.written);
    const rb = rowBytes(rgb8);
    // The header, 5 rows and half of the sixth.
    await writeFile(path, file.subarray(0, 64 + 5 * rb + (rb >> 1)));
    expect(await rowsReached(feed.progress, 5)).toBe(5);
    expect(Buffer.from(target, 0, 5 * rb).equals(Buffer.from(samples.subarray(0, 5 * rb)))).toBe(true);
    await appendFile(path, file.subarray(64 + 5 * rb + (rb >> 1), 64 + 15 * rb));
    expect(await rowsReached(feed.progress, 15)).toBe(15);
    expect(state(feed.progress)[0]).toBe(FEEDING);
    await appendFile(path, file.subarray(64 + 15 * rb)); // the rest, metadata included
    w.resolve();
    await feed.done;
    expect(state(feed.progress)).toEqual([FED, rgb8.height]);
    expect(Buffer.from(target).equals(Buffer.from(samples))).toBe(true);
  });

  it("fails with the writer's own error when the writer fails midway", async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 14));
    const path = join(dir, `fail${serial++}.v`);
    await writeFile(path, file.subarray(0, 64 + 4 * rowBytes(rgb8)));
    const w = writer();
    const feed = feedFromSpool(path, rgb8, new SharedArrayBuffer(size(rgb8)), w.written);
    await rowsReached(feed.progress, 4);
    const boom = new Error('the decoder found a corrupt block');
    w.reject(boom);
    await expect(feed.done).rejects.toBe(boom);
    expect(state(feed.progress)).toEqual([FEED_FAILED, 4]);
  });

  it("fails with the writer's error when the writer fails before making the file", async () => {
    const w = writer();
    const feed = feedFromSpool(join(dir, `never${serial++}.v`), rgb8, new SharedArrayBuffer(size(rgb8)), w.written);
    const boom = new Error('unreadable source');
    w.reject(boom);
    await expect(feed.done).rejects.toBe(boom);
    expect(state(feed.progress)[0]).toBe(FEED_FAILED);
  });

  it('fails when the file ends short of its last row after the writer finished', async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 15));
    const path = join(dir, `short${serial++}.v`);
    await writeFile(path, file.subarray(0, 64 + 7 * rowBytes(rgb8) + 3));
    const feed = feedFromSpool(path, rgb8, new SharedArrayBuffer(size(rgb8)), Promise.resolve());
    await expect(feed.done).rejects.toThrow(/ended before its last row/);
    expect(state(feed.progress)).toEqual([FEED_FAILED, 7]);
  });

  it('fails on a header that does not match the shape expected', async () => {
    const { path } = await vipsFile(rgb8, noise(size(rgb8), false, 16));
    const feed = feedFromSpool(path, { ...rgb8, height: 22 }, new SharedArrayBuffer(size(rgb8)), Promise.resolve());
    await expect(feed.done).rejects.toThrow(/spool file: the file is 37x23, not 37x22/);
    expect(state(feed.progress)).toEqual([FEED_FAILED, 0]);
  });

  it('stop() fails the feed at once and wakes a worker waiting for rows', async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 17));
    const path = join(dir, `stop${serial++}.v`);
    await writeFile(path, file.subarray(0, 64 + 2 * rowBytes(rgb8)));
    const w = writer();
    const feed = feedFromSpool(path, rgb8, new SharedArrayBuffer(size(rgb8)), w.written);
    await rowsReached(feed.progress, 2);
    const p = new Int32Array(feed.progress);
    const waiting = waitAsync(p, 1, 2);
    expect(waiting.async).toBe(true);
    feed.stop();
    expect(Atomics.load(p, 0)).toBe(FEED_FAILED);
    expect(await waiting.value).toBe('ok');
    await expect(feed.done).rejects.toThrow(/called off/);
    expect(state(feed.progress)).toEqual([FEED_FAILED, 2]);
    w.resolve();
  });
});
