import { existsSync, readFileSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WARM_HEIGHT, WARM_WIDTH } from '../../src/codec/warm.js';
import { SpoolDir } from '../../src/pool/spool/dir.js';
import { headerMismatch } from '../../src/pool/spool/rows.js';
import { type WarmTask, warmAnalyses, warmDecisions, warmTables, warmTask } from '../../src/pool/warm.js';
import { analyzeSpectrum } from '../../src/core/risk/index.js';
import { warmThreads } from '../../src/pool/warm-start.js';

describe('the warm start through the streamed path (pool/warm-start.ts, pool/warm.ts)', () => {
  let base: string;
  beforeAll(async () => {
    base = await mkdtemp(join(tmpdir(), 'fw-warm-'));
  });
  afterAll(() => rm(base, { recursive: true, force: true }));

  it('each thread gets the spool file sharp wrote, reads it as a streamed render does, and the file goes afterwards', async () => {
    const spool = SpoolDir.open(base)!;
    const seen: WarmTask[] = [];
    const results: number[] = [];
    try {
      await warmThreads(1, async (task) => {
        seen.push(task);
        const file = task.spooled!.path;
        // A libvips image file of the warm-up size, fully written before the threads start.
        expect(headerMismatch(readFileSync(file).subarray(0, 64), { width: WARM_WIDTH, height: WARM_HEIGHT, channels: 3, depth: 8 })).toBeNull();
        results.push(warmTask(task));
      }, spool);
      expect(seen).toHaveLength(1);
      expect(seen[0].spooled).toMatchObject({ width: WARM_WIDTH, height: WARM_HEIGHT });
      expect(results).toEqual([1]);
      expect(existsSync(seen[0].spooled!.path)).toBe(false);
    } finally {
      spool.close();
    }
  });

  it('without a spool folder the threads warm on pixels of their own; a spool file that is gone does not fail the start', async () => {
    const seen: WarmTask[] = [];
    await warmThreads(1, async (task) => seen.push(task), null);
    expect(seen[0].spooled).toBeUndefined();
    expect(warmTask({ ...seen[0], arrived: new SharedArrayBuffer(4) })).toBe(1);
    const gone = { arrived: new SharedArrayBuffer(4), threads: 1, spooled: { path: join(base, 'gone.v'), width: WARM_WIDTH, height: WARM_HEIGHT } };
    expect(warmTask(gone)).toBe(1);
  });
});

/** A 640 x 480 RGB raster of varied codes, for the warm start's decisions. */
const warmRaster = (() => {
  const width = 640;
  const height = 480;
  const data = new Uint8Array(width * height * 3);
  for (let i = 0; i < data.length; i++) data[i] = (i * 37) % 251;
  return { data, width, height, channels: 3 as const };
})();

describe('the warm start decides plans of every shape a request meets (pool/warm.ts warmDecisions)', () => {
  it('decides from below the pyramid to two levels of it, on the warm spectrum', () => {
    const { width, height } = warmRaster;
    const levels = warmDecisions(analyzeSpectrum(warmRaster), width, height);
    // Six scales (1.6x to 11x): the final stage alone, then one and two pyramid levels before it.
    expect(levels).toHaveLength(6);
    expect(levels[0]).toBe(0);
    expect(new Set(levels)).toEqual(new Set([0, 1, 2]));
    expect([...levels].sort()).toEqual(levels);
  });
});

describe('the warm start analyses and decides often enough for V8 to optimise that code (pool/warm.ts warmAnalyses)', () => {
  it('analyses at 8x four times, then at 2.7x, and decides every scale on the last spectrum and on a copy of it', () => {
    const { width, height } = warmRaster;
    const spectrum = analyzeSpectrum(warmRaster);
    const asked: number[] = [];
    const done = warmAnalyses((factor) => {
      asked.push(factor);
      return spectrum;
    }, width, height);
    expect(asked).toEqual([8, 8, 8, 8, 2.7]);
    // Six scales (warmDecisions) on the spectrum, six on its structured clone.
    expect(done).toBe(12);
  });
});

describe('the warm start makes the weight tables of a large source (pool/warm.ts warmTables)', () => {
  it('makes both axes of three widths, each with the ringing limiter\'s central lobes', () => {
    expect(warmTables()).toBe(6);
  });
});
