import { afterAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import type { Plan } from '../../src/core/types.js';
import { bandRows } from '../../src/pool/bands.js';
import { RenderPool } from '../../src/pool/render-pool.js';
import { piscinaRunner } from '../../src/pool/runner.js';
import type { ResampleTask } from '../../src/pool/worker.js';
import { gratingRaw } from '../helpers/damage.js';

const plan = (sw: number, sh: number, tw: number, th: number): Plan =>
  makePlan({ sourceWidth: sw, sourceHeight: sh, targetWidth: tw, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });

const source = (width: number, height: number) => ({ path: '/nowhere.v', width, height, channels: 3 as const, depth: 8 as const, state: new SharedArrayBuffer(4) });

describe('bandRows: which renders split their output rows over two threads', () => {
  it('splits a small output of a big source (the work grows with the source), and a big output of a small one', () => {
    // 6.4 MP to 640 x 400: 256,000 output pixels, under 512 x 512, but 6.4 M source pixels.
    expect(bandRows(2, source(3200, 2000), plan(3200, 2000, 640, 400), false)).toEqual([[0, 200], [200, 400]]);
    expect(bandRows(2, source(600, 600), plan(600, 600, 1200, 1200), false)).toEqual([[0, 600], [600, 1200]]);
  });

  it('keeps one band for a small source to a small output, a single thread, or a very short output', () => {
    expect(bandRows(2, source(1000, 800), plan(1000, 800, 400, 320), false)).toEqual([[0, 320]]);
    expect(bandRows(1, source(3200, 2000), plan(3200, 2000, 640, 400), false)).toEqual([[0, 400]]);
    expect(bandRows(2, source(8000, 100), plan(8000, 100, 1200, 15), false)).toEqual([[0, 15]]);
  });

  it('keeps one band, paced by the decode, for a source still arriving that shrinks by over 4 in area', () => {
    expect(bandRows(2, source(3200, 2000), plan(3200, 2000, 640, 400), true)).toEqual([[0, 400]]);
    // Shrinking less: split even while arriving.
    expect(bandRows(2, source(1600, 1200), plan(1600, 1200, 1200, 900), true)).toEqual([[0, 450], [450, 900]]);
  });
});

describe('a split small output of a big source', () => {
  const tasks: ResampleTask[][] = [[], []];
  const pools = [1, 2].map((threads, i) => new RenderPool({
    threads, maxQueue: 4, retryAfterSeconds: 1,
    runner: (piscina) => {
      const run = piscinaRunner(piscina);
      return (task, options) => {
        tasks[i].push(task);
        return run(task, options);
      };
    },
  }));
  afterAll(() => Promise.all(pools.map((p) => p.close())));

  it('has the bytes of one band on one thread (bands make exactly the rows of the whole)', async () => {
    const src = { data: new Uint8Array(gratingRaw(1400, 1000)), width: 1400, height: 1000, channels: 3 as const }; // 1.4 MP
    const p = plan(1400, 1000, 280, 200); // 56,000 output pixels
    const [one, two] = await Promise.all(pools.map((pool) => pool.resample(src, p)));
    expect(tasks[0].map((t) => t.rows)).toEqual([[0, 200]]);
    expect(tasks[1].map((t) => t.rows)).toEqual([[0, 100], [100, 200]]);
    expect(two.width).toBe(280);
    expect(Buffer.from(two.data.buffer, two.data.byteOffset, two.data.byteLength).equals(Buffer.from(one.data.buffer, one.data.byteOffset, one.data.byteLength))).toBe(true);
  });
});
