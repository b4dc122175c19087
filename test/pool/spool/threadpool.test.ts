import { appendFileSync, writeFileSync } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../../src/core/index.js';
import { RenderPool } from '../../../src/pool/render-pool.js';
import { type BusyThreadpool, occupyThreadpool } from '../../helpers/busy-threadpool.js';

const shape = { width: 41, height: 19, channels: 3 as const, depth: 8 as const };
const rowBytes = shape.width * shape.channels;
const plan = makePlan({ sourceWidth: 41, sourceHeight: 19, targetWidth: 20, targetHeight: 9, kernel: 'auto', prefilter: 'auto', light: 'linear' });

let dir: string;
let samples: Buffer;
let file: Buffer;
let pool: RenderPool;
let busy: BusyThreadpool | undefined;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-spool-pool-'));
  samples = Buffer.alloc(rowBytes * shape.height);
  for (let i = 0; i < samples.length; i++) samples[i] = (i * 37 + (i >> 7)) & 255;
  const path = join(dir, 'source.v');
  await sharp(samples, { raw: { width: shape.width, height: shape.height, channels: 3 } }).toFile(path);
  file = await readFile(path);
  pool = new RenderPool({ threads: 1, maxQueue: 0, retryAfterSeconds: 1 });
});
afterAll(async () => {
  await busy?.release();
  await pool.close();
  await rm(dir, { recursive: true, force: true });
});

describe('RenderPool.resampleSpooled while every libuv pool thread is busy', () => {
  // sharp holds a pool thread for each whole decode or encode; the workers read the spool file
  // themselves, synchronously, so rows reach the resample whatever that pool is doing.
  it('follows a file made late that grows in pieces, and renders what the whole file renders', async () => {
    const whole = await pool.resample({ data: new Uint8Array(samples), ...shape }, plan);
    const path = join(dir, 'grow.v');
    busy = occupyThreadpool(dir);
    let finish!: () => void;
    const written = new Promise<void>((resolve) => (finish = resolve));
    const render = pool.resampleSpooled(path, shape, written, plan);
    // Written synchronously, in turns of this thread's event loop: the file appears, grows,
    // and is finished only after the render has started waiting for it.
    await new Promise((r) => setImmediate(r));
    writeFileSync(path, file.subarray(0, 64 + 6 * rowBytes));
    await new Promise((r) => setImmediate(r));
    appendFileSync(path, file.subarray(64 + 6 * rowBytes));
    finish();
    const out = await render;
    expect(Buffer.from(out.data.buffer, out.data.byteOffset, out.data.byteLength).equals(Buffer.from(whole.data.buffer, whole.data.byteOffset, whole.data.byteLength))).toBe(true);
    await busy.release();
  }, 15_000);
});
