import { describe, expect, it } from 'vitest';
import { makePlan, renderRaster } from '../../src/core/index.js';
import type { PixelRaster } from '../../src/core/types.js';
import { RenderPool } from '../../src/pool/render-pool.js';
import { StagingBuffers } from '../../src/pool/staging.js';
import { until } from '../faults/pool-tap.js';

const MiB = 2 ** 20;

function raster(width: number, height: number, seed: number): PixelRaster {
  const data = new Uint8Array(width * height * 3);
  let s = seed;
  for (let i = 0; i < data.length; i++) data[i] = (s = (s * 1103515245 + 12345) >>> 0) >>> 24;
  return { data, width, height, channels: 3 };
}

describe('StagingBuffers', () => {
  it('hands back a returned buffer for any source that fits, the smallest that fits first', () => {
    const s = new StagingBuffers(2, 64 * MiB);
    const big = s.take(10 * MiB);
    const small = s.take(3 * MiB + 1);
    expect(big.byteLength).toBe(10 * MiB);
    expect(small.byteLength).toBe(4 * MiB); // whole MiB
    s.give(big);
    s.give(small);
    expect(s.take(2 * MiB)).toBe(small);
    expect(s.take(2 * MiB)).toBe(big);
    expect(s.take(2 * MiB)).not.toBe(big); // none idle: a new one
  });

  it('keeps at most `keep` idle buffers (the largest) and none above maxBytes', () => {
    const s = new StagingBuffers(2, 8 * MiB);
    const bufs = [1, 2, 3].map((m) => s.take(m * MiB));
    for (const b of bufs) s.give(b);
    expect(s.idleBytes).toBe(5 * MiB);
    s.give(s.take(9 * MiB));
    expect(s.idleBytes).toBe(5 * MiB);
  });
});

describe('RenderPool with reused source buffers', () => {
  it('renders a smaller source from a larger reused buffer exactly as the core does in-process', async () => {
    const pool = new RenderPool({ threads: 2, maxQueue: 0, retryAfterSeconds: 1 });
    try {
      for (const [w, h, tw, th] of [[900, 700, 600, 500], [640, 480, 520, 520]]) {
        const src = raster(w, h, w);
        const plan = makePlan({ sourceWidth: w, sourceHeight: h, targetWidth: tw, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });
        const got = await pool.resample(src, plan);
        expect(Buffer.from(got.data as Uint8Array).equals(Buffer.from(renderRaster(src, plan).data as Uint8Array))).toBe(true);
      }
    } finally {
      await pool.close();
    }
  });
});

describe('RenderPool with a source over the reuse limit (64 MiB)', () => {
  it('unmaps its buffer once the render ends: no worker thread keeps it (issue 18)', async () => {
    const pool = new RenderPool({ threads: 2, maxQueue: 0, retryAfterSeconds: 1 });
    try {
      // 4800x4800 RGB, 66 MiB: a fresh buffer of its own, not kept (staging.ts).
      const src = { data: new Uint8Array(4800 * 4800 * 3).fill(90), width: 4800, height: 4800, channels: 3 } as const;
      const plan = makePlan({ sourceWidth: 4800, sourceHeight: 4800, targetWidth: 64, targetHeight: 64, kernel: 'auto', prefilter: 'auto', light: 'linear' });
      const before = process.memoryUsage().arrayBuffers;
      const got = await pool.resample(src, plan);
      expect(got.data[0]).toBe(90);
      // The worker collects after its task (worker.ts), this thread after the render (hand-back.ts).
      await until(() => process.memoryUsage().arrayBuffers < before + 16 * MiB, 2_000_000);
      expect(process.memoryUsage().arrayBuffers).toBeLessThan(before + 16 * MiB);
      expect(pool.memory().stagingIdleBytes).toBe(0);
    } finally {
      await pool.close();
    }
  });
});
