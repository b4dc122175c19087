import { mkdtemp, readFile, rm, symlink, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { headerMismatch, type SpoolShape as FeedShape, SpoolReadError, SpoolRows, STOPPED, WRITING, WRITTEN } from '../../../src/pool/spool/rows.js';

let dir: string;
let serial = 0;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-spool-rows-'));
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

/** The writer's state for a reader: WRITING, WRITTEN or STOPPED. */
const writerState = (s: number) => {
  const a = new Int32Array(new SharedArrayBuffer(4));
  a[0] = s;
  return a;
};

/** Every row through rowAt, in order from `from`, as one buffer of samples. */
function readRows(reader: SpoolRows, shape: FeedShape, from = 0): Buffer {
  const n = shape.width * shape.channels;
  const parts: Buffer[] = [];
  for (let y = from; y < shape.height; y++) {
    const { data, at } = reader.rowAt(y);
    parts.push(Buffer.from(asBytes(data.subarray(at, at + n))));
  }
  return Buffer.concat(parts);
}

/** The typed fault of a file that is not what was written for the render. */
const wrongFile = (message: string) => expect.objectContaining({ name: 'SpoolReadError', fault: 'wrong-file', message });

describe('SpoolRows (a worker reading a spool file row by row)', () => {
  it.each([['8-bit RGB', rgb8, 11], ['16-bit grey', grey16, 12]] as const)('gives every row of a complete %s file exactly', async (_n, shape, seed) => {
    const samples = noise(size(shape) / (shape.depth / 8), shape.depth === 16, seed);
    const { path } = await vipsFile(shape, samples);
    const reader = new SpoolRows(path, shape, writerState(WRITTEN));
    try {
      expect(readRows(reader, shape).equals(asBytes(samples))).toBe(true);
    } finally {
      reader.close();
    }
  });

  it('starts where a band starts (rows above it are never read), in blocks bigger than a row', async () => {
    const tall: FeedShape = { width: 8, height: 300, channels: 3, depth: 8 };
    const samples = noise(size(tall), false, 13);
    const { path } = await vipsFile(tall, samples);
    const reader = new SpoolRows(path, tall, writerState(WRITTEN));
    try {
      const from = 123;
      expect(readRows(reader, tall, from).equals(asBytes(samples.subarray(from * rowBytes(tall))))).toBe(true);
      // One read fills a block of many rows: consecutive rows share the reader's buffer.
      const a = reader.rowAt(299);
      expect(a.at).toBeGreaterThan(0);
    } finally {
      reader.close();
    }
  });

  it('reads what is there while the writer is still at work, whole rows only', async () => {
    const samples = noise(size(rgb8), false, 14);
    const { file } = await vipsFile(rgb8, samples);
    const path = join(dir, `grow-${serial++}.v`);
    // The header and 5 rows and a half: rows 0..4 are there, row 5 is not yet whole.
    await writeFile(path, file.subarray(0, 64 + 5.5 * rowBytes(rgb8)));
    const state = writerState(WRITING);
    const reader = new SpoolRows(path, rgb8, state);
    try {
      for (let y = 0; y < 5; y++) {
        const { data, at } = reader.rowAt(y);
        expect(Buffer.from(data.subarray(at, at + rowBytes(rgb8))).equals(asBytes(samples.subarray(y * rowBytes(rgb8), (y + 1) * rowBytes(rgb8))))).toBe(true);
      }
      // Row 5 is not whole: once the render is called off the wait ends with an error.
      state[0] = STOPPED;
      expect(() => reader.rowAt(5)).toThrow(expect.objectContaining({ fault: 'stopped', message: 'the source stopped arriving' }));
    } finally {
      reader.close();
    }
  });

  it('fails when the file ends before a row once the writer has finished', async () => {
    const { file } = await vipsFile(rgb8, noise(size(rgb8), false, 15));
    const path = join(dir, `short-${serial++}.v`);
    await writeFile(path, file.subarray(0, 64 + 10 * rowBytes(rgb8)));
    const reader = new SpoolRows(path, rgb8, writerState(WRITTEN));
    try {
      expect(() => readRows(reader, rgb8)).toThrow(wrongFile('it ends before row 10'));
    } finally {
      reader.close();
    }
  });

  it('fails on a file never made once the writer has finished, and on a header for another shape', async () => {
    expect(() => new SpoolRows(join(dir, 'never.v'), rgb8, writerState(WRITTEN)).rowAt(0)).toThrow(wrongFile('it was never made'));
    const { path } = await vipsFile(rgb8, noise(size(rgb8), false, 16));
    const reader = new SpoolRows(path, { ...rgb8, height: 24 }, writerState(WRITTEN));
    expect(() => reader.rowAt(0)).toThrow(wrongFile('the file is 37x23, not 37x24'));
    reader.close();
  });

  it('names a file it cannot open as a read failure (not a fault of the source)', async () => {
    const path = join(dir, `loop-${serial++}.v`);
    await symlink(path, path);
    const read = () => new SpoolRows(path, rgb8, writerState(WRITING)).rowAt(0);
    expect(read).toThrow(SpoolReadError);
    expect(read).toThrow(expect.objectContaining({ fault: 'unreadable', message: expect.stringMatching(/^ELOOP/) }));
  });
});

describe('SpoolRows blocks kept for the thread\'s next reader (fresh memory costs page faults)', () => {
  it('gives a closed reader\'s block to the next one, whose rows are exact over the stale bytes, and the closed one reads no more', async () => {
    const deep = noise(size(grey16) / 2, true, 21);
    const first = new SpoolRows((await vipsFile(grey16, deep)).path, grey16, writerState(WRITTEN));
    expect(readRows(first, grey16).equals(asBytes(deep))).toBe(true);
    const block = first.rowAt(0).data.buffer;
    first.close();
    expect(() => first.rowAt(0)).toThrow(expect.objectContaining({ fault: 'stopped', message: 'the reader is closed' }));
    // A smaller 8-bit shape fits in the 16-bit reader's block (the smallest kept block that fits is taken).
    const small: FeedShape = { width: 11, height: 7, channels: 3, depth: 8 };
    expect(rowBytes(small) * small.height).toBeLessThan(block.byteLength);
    const samples = noise(size(small), false, 22);
    const second = new SpoolRows((await vipsFile(small, samples)).path, small, writerState(WRITTEN));
    try {
      expect(readRows(second, small).equals(asBytes(samples))).toBe(true);
      expect(second.rowAt(0).data.buffer).toBe(block);
      expect(second.rowAt(0).data.length).toBe(size(small));
    } finally {
      second.close();
    }
  });

  it('keeps a closed reader\'s block of up to 8 MiB for the next reader, and none larger (which two are kept: StagingBuffers)', async () => {
    const tall: FeedShape = { width: 1024, height: 3000, channels: 3, depth: 8 };
    const { path } = await vipsFile(tall, noise(size(tall), false, 23));
    const blockOf = (minRows: number) => {
      const reader = new SpoolRows(path, tall, writerState(WRITTEN), minRows);
      const buffer = reader.rowAt(0).data.buffer;
      reader.close();
      return buffer;
    };
    // All 3000 rows in one block: 9 MiB, made for that reader alone.
    const big = blockOf(3000);
    expect(big.byteLength).toBe(9 * 2 ** 20);
    expect(blockOf(3000)).not.toBe(big);
    // 2000 rows: 6 MiB, kept and handed to the next reader that needs that much.
    const kept = blockOf(2000);
    expect(kept.byteLength).toBe(6 * 2 ** 20);
    expect(blockOf(2000)).toBe(kept);
  });
});
