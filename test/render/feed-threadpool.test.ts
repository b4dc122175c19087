import { appendFileSync, writeFileSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FED, FEED_FAILED, feedFromSpool, type FeedShape } from '../../src/render/feed.js';
import { type BusyThreadpool, occupyThreadpool } from '../helpers/busy-threadpool.js';

const shape: FeedShape = { width: 41, height: 19, channels: 3, depth: 8 };
const rowBytes = shape.width * shape.channels;

let dir: string;
let samples: Buffer;
let file: Buffer;
let busy: BusyThreadpool | undefined;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-feed-pool-'));
  samples = Buffer.alloc(rowBytes * shape.height);
  for (let i = 0; i < samples.length; i++) samples[i] = (i * 37 + (i >> 7)) & 255;
  const path = join(dir, 'source.v');
  await sharp(samples, { raw: { width: shape.width, height: shape.height, channels: 3 } }).toFile(path);
  file = await readFile(path);
});
afterAll(async () => {
  await busy?.release();
  await rm(dir, { recursive: true, force: true });
});

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

describe('feedFromSpool while libuv pool threads are all busy', () => {
  // sharp holds a pool thread for each whole decode or encode: with four at once (two spooled
  // decodes and two encodes will do), rows must still reach the workers as they are written.
  it('follows the growing file without waiting for a pool thread', async () => {
    const path = join(dir, 'grow.v');
    busy = occupyThreadpool(dir);
    // Written synchronously: this thread's own writes do not need the pool either.
    writeFileSync(path, file.subarray(0, 64 + 6 * rowBytes));
    let finish!: () => void;
    const written = new Promise<void>((resolve) => (finish = resolve));
    const target = new SharedArrayBuffer(samples.length);
    const feed = feedFromSpool(path, shape, target, written);
    expect(await rowsReached(feed.progress, 6)).toBe(6);
    appendFileSync(path, file.subarray(64 + 6 * rowBytes));
    finish();
    await feed.done;
    expect(Array.from(new Int32Array(feed.progress))).toEqual([FED, shape.height]);
    expect(Buffer.from(target).equals(samples)).toBe(true);
    await busy.release();
  }, 15_000);
});
