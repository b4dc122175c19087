import { rmSync } from 'node:fs';
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { resolveConfig } from '../../../src/config.js';
import { kernelNames, makePlan } from '../../../src/core/index.js';
import { RenderPool } from '../../../src/pool/render-pool.js';
import { resampleWhileDecoding } from '../../../src/rendition/streamed.js';
import { StageClock } from '../../../src/rendition/timings.js';
import { compileRenditionQuery } from '../../../src/schemas/rendition.js';
import { type BusyThreadpool, occupyThreadpool } from '../../helpers/busy-threadpool.js';

// Runs right after the header probe, before the decode's libvips job is queued.
const hooks = vi.hoisted(() => ({ afterProbe: undefined as undefined | (() => void) }));
vi.mock('../../../src/codec/spool-decode.js', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../../src/codec/spool-decode.js')>();
  return {
    ...real,
    probeSpooledDecode: async (...args: Parameters<typeof real.probeSpooledDecode>) => {
      const probe = await real.probeSpooledDecode(...args);
      hooks.afterProbe?.();
      return probe;
    },
  };
});

const W = 1280;
const H = 820;

let base: string;
let pool: RenderPool;
let jpeg: Buffer;
let busy: BusyThreadpool | undefined;
beforeAll(async () => {
  base = await mkdtemp(join(tmpdir(), 'fw-streamed-cleanup-'));
  pool = new RenderPool({ threads: 1, maxQueue: 0, retryAfterSeconds: 1, spoolDir: base });
  const raw = Buffer.alloc(W * H * 3);
  for (let i = 0; i < raw.length; i++) raw[i] = (i * 7 + (i >> 11)) & 255;
  jpeg = await sharp(raw, { raw: { width: W, height: H, channels: 3 } }).jpeg().toBuffer();
  // The worker thread up and its modules loaded before the libuv pool is taken.
  const tiny = { data: new Uint8Array(16 * 16 * 3).fill(90), width: 16, height: 16, channels: 3 as const };
  await pool.resample(tiny, makePlan({ sourceWidth: 16, sourceHeight: 16, targetWidth: 8, targetHeight: 8, kernel: 'auto', prefilter: 'auto', light: 'linear' }));
});
afterAll(async () => {
  await busy?.release();
  await pool.close();
  await rm(base, { recursive: true, force: true });
});

describe('resampleWhileDecoding: the spool file of a failed render', () => {
  // Under load libvips' job can wait for a libuv pool thread past the decode deadline: the
  // render is answered and its file removed before libvips has even made it.
  it('is removed once libvips is done with it, also when libvips makes it after the render was answered', async () => {
    const config = resolveConfig({ limits: { decodeTimeoutMs: 200 } });
    const spool = pool.spool!;
    let removals = 0;
    let removedAgain!: () => void;
    const again = new Promise<void>((resolve) => (removedAgain = resolve));
    // The first removal lets the pool threads go, so libvips makes the file after it.
    spool.remove = async (path: string) => {
      rmSync(path, { force: true });
      if (++removals === 1) void busy!.release();
      else removedAgain();
    };
    hooks.afterProbe = () => {
      busy = occupyThreadpool(base);
    };
    const q = compileRenditionQuery({ maxDimension: config.limits.maxDimension, kernelNames }).parse({ width: '80', prefilter: 'none', format: 'png' });
    const ctx = { pool, limits: config.limits, clock: new StageClock() };
    const source = { identity: { key: 'late.jpg', version: '1' }, bytes: jpeg };
    await expect(resampleWhileDecoding(ctx, source, q)).rejects.toMatchObject({ code: 'ERR_LIMIT_DECODE_TIMEOUT' });
    await again;
    expect(await readdir(spool.dir)).toEqual([]);
  }, 20_000);
});

describe('resampleWhileDecoding: the spool file of a rendition', () => {
  it('goes while the rendition is encoded: the raster comes first, `cleaned` once the file is removed', async () => {
    hooks.afterProbe = undefined;
    const config = resolveConfig({});
    const spool = pool.spool!;
    const events: string[] = [];
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    spool.remove = async (path: string) => {
      events.push('removal started');
      await gate;
      rmSync(path, { force: true });
      events.push('removed');
    };
    const q = compileRenditionQuery({ maxDimension: config.limits.maxDimension, kernelNames }).parse({ width: '80', prefilter: 'none', format: 'png' });
    const source = { identity: { key: 'ok.jpg', version: '1' }, bytes: jpeg };
    const done = await resampleWhileDecoding({ pool, limits: config.limits, clock: new StageClock() }, source, q);
    events.push('raster');
    expect(done!.raster.width).toBe(80);
    const cleaned = done!.cleaned.then(() => events.push('cleaned'));
    release();
    await cleaned;
    await done!.cleaned;
    // The file is removed once more when libvips' job is done (the first test's case): either order.
    expect(events.slice(0, 2)).toEqual(['removal started', 'raster']);
    expect(events.indexOf('removed')).toBeGreaterThan(1);
    expect(events.indexOf('cleaned')).toBeGreaterThan(events.indexOf('removed'));
    expect(await readdir(spool.dir)).toEqual([]);
  }, 20_000);
});
