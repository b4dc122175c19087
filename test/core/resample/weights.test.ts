import { describe, expect, it } from 'vitest';
import { findKernel, kernelNames } from '../../../src/core/kernels/index.js';
import { buildWeights, stretchedFilter, finalTable } from '../../../src/core/resample/index.js';

function table2x(name: string) {
  const k = findKernel(name)!;
  return buildWeights(64, 32, 0.5, 2, stretchedFilter(k, 2, 0));
}

describe('weight tables', () => {
  // Pillow's resampling (values measured from it, CHECKS.md): 2x downscale, support stretched.
  it.each([
    ['box', [1, 1].map((v) => v / 2)],
    ['triangle', [1, 3, 3, 1].map((v) => v / 8)],
    ['catmull-rom', [-3, -9, 29, 111, 111, 29, -9, -3].map((v) => v / 256)],
  ] as Array<[string, number[]]>)('%s 2x rows match Pillow', (name, want) => {
    const t = table2x(name);
    const o = 10;
    const got = Array.from(t.weights.subarray(o * t.taps, (o + 1) * t.taps)).filter((w) => w !== 0);
    expect(got.length).toBe(want.length);
    got.forEach((w, i) => expect(w).toBeCloseTo(want[i], 6)); // float32 tables
    // Centre of output o is 2o + 0.5 (x = (o + 1/2) s - 1/2): the taps straddle 2o and 2o + 1.
    expect(t.centre[o]).toBe(20.5);
  });

  // CHECKS.md: every kernel's weights sum to 1 at every phase after normalisation.
  const scales = [0.37, 1, 1.5, 2, 3, 4.7, 8];
  describe.each(kernelNames.map((n) => [n]))('%s', (name) => {
    it.each(scales.map((s) => [s]))('rows sum to 1 at every phase, scale %f, with and without sigma', (s) => {
      for (const sigma of [0, 0.8 * s]) {
        const src = 200;
        const dst = Math.max(1, Math.round(src / s));
        const t = finalTable(src, 0, src, dst, { scale: src / dst, kernel: name, sigma, pyramidLevels: 0 });
        for (let o = 0; o < dst; o++) {
          let sum = 0;
          for (let k = 0; k < t.taps; k++) sum += t.weights[o * t.taps + k];
          // Stored as float32: the sum is 1 within float32 rounding of a few dozen terms.
          if (Math.abs(sum - 1) > 1e-6) expect(sum).toBe(1);
          expect(t.start[o]).toBeGreaterThanOrEqual(0);
          expect(t.start[o] + t.taps).toBeLessThanOrEqual(src);
        }
      }
    });
  });

  it('folds a fractional crop into the table (no rounding to whole pixels)', () => {
    const ax = { scale: 1, kernel: 'lanczos-3', sigma: 0, pyramidLevels: 0 };
    const t = finalTable(100, 10.25, 50, 50, ax);
    expect(t.centre[0]).toBeCloseTo(10.25, 12);
    expect(t.centre[49]).toBeCloseTo(59.25, 12);
  });
});
