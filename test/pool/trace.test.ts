import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePlan } from '../../src/core/index.js';
import type { Mark } from '../../src/pool/trace.js';

// The timeline is opt-in, read when the modules load (and by the pool's threads, which inherit it).
process.env.FOLDWISE_TIMELINE = '1';
const { WaitSpans, tracing } = await import('../../src/pool/trace.js');
const { collectMarks } = await import('../../src/pool/trace-scope.js');
const { RenderPool } = await import('../../src/pool/render-pool.js');

describe('WaitSpans', () => {
  it('merges waits less than half a millisecond apart, keeps the others apart', () => {
    const w = new WaitSpans();
    w.add(10, 11);
    w.add(11.2, 12.2);
    w.add(14, 15);
    expect(w.spans).toEqual([[10, 12.2], [14, 15]]);
    expect(w.marks('wait for rows', 'w1')).toEqual([
      { what: 'wait for rows', thread: 'w1', start: 10, end: 12.2 },
      { what: 'wait for rows', thread: 'w1', start: 14, end: 15 },
    ]);
  });
});

describe('a traced spooled render (FOLDWISE_TIMELINE=1)', () => {
  let pool: InstanceType<typeof RenderPool>;
  beforeAll(() => {
    pool = new RenderPool({ threads: 2, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto' });
  });
  afterAll(() => pool.close());

  it("hands its worker's band and analysis spans back to the render that collects them", async () => {
    expect(tracing).toBe(true);
    const shape = { width: 640, height: 480, channels: 3 as const, depth: 8 as const };
    const raw = Buffer.alloc(640 * 480 * 3).map((_, i) => (i * 13) & 255);
    const plan = makePlan({ sourceWidth: 640, sourceHeight: 480, targetWidth: 160, targetHeight: 120, kernel: 'auto', prefilter: 'auto', light: 'linear' });
    const half = makePlan({ sourceWidth: 640, sourceHeight: 480, targetWidth: 80, targetHeight: 60, kernel: 'auto', prefilter: 'auto', light: 'linear' });
    const path = pool.spool!.path();
    const marks: Mark[] = [];
    const other: Mark[] = [];
    try {
      await sharp(raw, { raw: { width: 640, height: 480, channels: 3 } }).toFile(path);
      const state = new SharedArrayBuffer(4);
      Atomics.store(new Int32Array(state), 0, 1); // WRITTEN
      // A render started outside the collecting scope runs beside the collected one: its spans
      // (an 80 px output) reach neither `marks` nor a scope collecting nothing else.
      const outside = pool.resampleSpooled(path, shape, Promise.resolve(), half);
      await collectMarks(marks, async () => {
        await pool.resampleSpooled(path, shape, Promise.resolve(), plan);
        await pool.analyse({ path, ...shape, state }, plan);
      });
      await collectMarks(other, () => outside);
    } finally {
      await pool.spool!.remove(path);
    }
    // One band, or two when the first handed its rest over (rest-band.ts): together rows 0-120.
    const bands = marks.filter((m) => m.what.startsWith('band ')).map((m) => [...m.what.matchAll(/\d+/g)].slice(0, 2).map(Number));
    expect(bands[0][0]).toBe(0);
    expect(Math.max(...bands.map((b) => b[1]))).toBe(120);
    for (const m of marks.filter((x) => x.what.startsWith('band '))) {
      expect(m.thread).toMatch(/^w\d+$/);
      expect(m.what).toContain('(160 px');
    }
    expect(marks.filter((m) => m.what.startsWith('analysis: ')).map((m) => m.what)).toEqual(['analysis: plan response', 'analysis: spectrum', 'analysis: decision']);
    for (const m of marks) expect(m.end).toBeGreaterThanOrEqual(m.start);
    expect(other).toEqual([]);
  });
});
