import { describe, expect, it } from 'vitest';
import { findKernel } from '../../../src/core/kernels/index.js';
import type { AxisFilter } from '../../../src/core/resample/filter.js';
import { compensatedFilter } from '../../../src/core/resample/compensate.js';
import { buildWeights, stretchedFilter } from '../../../src/core/resample/index.js';
import { periodOf } from '../../../src/core/resample/weights.js';

/**
 * Every row evaluated on its own, as buildWeights did before it copied rows one period on:
 * whole-sample mirror at the borders, each row normalised to sum 1 with the float32 rounding
 * moved onto its largest weight. The copies must give these tables bit for bit.
 */
function rowByRow(srcLen: number, dstLen: number, origin: number, step: number, f: AxisFilter) {
  const mirror = (j: number) => {
    const m = j < 0 ? -j : j >= srcLen ? 2 * srcLen - 2 - j : j;
    return m < 0 ? 0 : m >= srcLen ? srcLen - 1 : m;
  };
  const lo: number[] = [];
  let span = 1;
  for (let o = 0; o < dstLen; o++) {
    const c = origin + o * step;
    const taps = [];
    for (let j = Math.ceil(c - f.support); j <= Math.floor(c + f.support); j++) taps.push(mirror(j));
    const a = Math.min(...taps);
    lo.push(a);
    span = Math.max(span, Math.max(...taps) - a + 1);
  }
  const taps = Math.min(span, srcLen);
  const weights = new Float32Array(dstLen * taps);
  const start = new Int32Array(dstLen);
  for (let o = 0; o < dstLen; o++) {
    const c = origin + o * step;
    const s = Math.min(lo[o], srcLen - taps);
    start[o] = s;
    const row = new Float64Array(taps);
    for (let j = Math.ceil(c - f.support); j <= Math.floor(c + f.support); j++) row[mirror(j) - s] += f.at(j - c);
    const sum = row.reduce((x, y) => x + y, 0);
    let big = 0;
    let stored = 0;
    for (let k = 0; k < taps; k++) {
      weights[o * taps + k] = row[k] * (1 / sum);
      stored += weights[o * taps + k];
      if (Math.abs(row[k]) > Math.abs(row[big])) big = k;
    }
    weights[o * taps + big] += 1 - stored;
  }
  return { taps, start, weights };
}

describe('weight rows copied one period on (buildWeights)', () => {
  it('finds the period of common size ratios, and none where there is none', () => {
    // 2304 -> 800: 2.88 = 72/25; 4432 -> 800: 5.54 = 277/50; 3200 -> 800: 4.
    expect([periodOf(2304 / 800, 800), periodOf(4432 / 800, 800), periodOf(3200 / 800, 800), periodOf(1 / 3, 900)]).toEqual([25, 50, 1, 3]);
    expect(periodOf(Math.PI, 800)).toBe(0);
    // 2304 -> 801 repeats every 89 rows (gcd 9); 2304 -> 797 (a prime) only after the whole table: none.
    expect([periodOf(2304 / 801, 801), periodOf(2304 / 797, 797)]).toEqual([89, 0]);
  });

  // Camera and page sizes, the bench's pictures, an enlargement, a crop's odd origin, a
  // compensated pyramid stage: each kernel family's tables.
  const cases: Array<[string, number, number, number, number]> = [
    ['bandlimit', 2304, 800, 0, 0], ['bandlimit', 1728, 600, 0, 0], ['lanczos-3', 4432, 1024, 0, 0],
    ['catmull-rom', 3324, 768, 0, 0], ['bandlimit', 3200, 640, 0.37, 0], ['lanczos-3', 300, 1200, 0, 0],
    ['bandlimit', 2216, 800, 0, 1], ['gaussian', 1000, 250, 0, 0.8],
  ];
  it.each(cases)('%s %i -> %i (origin offset %f, sigma %f): the row-by-row table bit for bit', (name, src, dst, offset, sigma) => {
    const kernel = findKernel(name)!;
    const step = src / dst;
    const origin = (step - 1) / 2 + offset;
    const filter = name === 'bandlimit' && offset === 0 && sigma === 1 ? compensatedFilter(kernel, step * 2, 0, 1) : stretchedFilter(kernel, Math.max(1, step), sigma);
    const got = buildWeights(src, dst, origin, step, filter);
    const want = rowByRow(src, dst, origin, step, filter);
    expect(got.taps).toBe(want.taps);
    expect(Array.from(got.start)).toEqual(Array.from(want.start));
    const differing = got.weights.reduce((n, w, i) => n + (Object.is(w, want.weights[i]) ? 0 : 1), 0);
    expect(differing).toBe(0);
    // Rows did repeat: the period is shorter than the table wherever the ratio has one.
    if (periodOf(step, dst) > 0) {
      const p = periodOf(step, dst);
      const o = Math.floor(dst / 2);
      expect(Array.from(got.weights.subarray(o * got.taps, (o + 1) * got.taps))).toEqual(Array.from(got.weights.subarray((o + p) * got.taps, (o + p + 1) * got.taps)));
    }
  });
});
