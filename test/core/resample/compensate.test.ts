import { describe, expect, it } from 'vitest';
import { findKernel, type Kernel } from '../../../src/core/kernels/index.js';
import { compensatedFilter, cosineSum } from '../../../src/core/resample/compensate.js';
import { pyramidChainResponse } from '../../../src/core/resample/pyramid.js';

/**
 * The design as first written (one kernel sample and one Math.cos per frequency and tap): the
 * slow direct version the faster loop (turned cosines, pipeline version 8) must stay within
 * rounding of: 1e-12 of the filter's peak, far below float32's 6e-8 step of the weights.
 */
function reference(kernel: Kernel, scale: number, sigma: number, levels: number): (x: number) => number {
  const F_STEPS = 512;
  const X_STEPS = 64;
  const unit = 2 ** levels;
  const reach = kernel.support * scale;
  const fMax = 1 / scale;
  const df = fMax / F_STEPS;
  const dx = scale / X_STEPS;
  const kx = Math.ceil(reach / dx);
  const gain = new Float64Array(F_STEPS);
  for (let i = 0; i < F_STEPS; i++) {
    const f = (i + 0.5) * df;
    let t = 0;
    for (let j = -kx; j <= kx; j++) t += kernel.weight((j * dx) / scale) * Math.cos(2 * Math.PI * f * j * dx);
    gain[i] = (t * Math.exp(-2 * Math.PI ** 2 * sigma * sigma * f * f)) / pyramidChainResponse(f, levels);
  }
  const support = reach + 0.5 * scale;
  const n = Math.ceil(support / dx);
  const table = new Float64Array(n + 2);
  for (let j = 0; j <= n; j++) {
    let g = 0;
    for (let i = 0; i < F_STEPS; i++) g += gain[i] * Math.cos(2 * Math.PI * (i + 0.5) * df * j * dx);
    table[j] = g;
  }
  const levelDx = dx / unit;
  return (x) => {
    const u = Math.abs(x) / levelDx;
    if (!(u < n)) return 0;
    const i = Math.floor(u);
    const t = u - i;
    return table[i] * (1 - t) + table[i + 1] * t;
  };
}

describe('compensatedFilter (the final filter after a pyramid)', () => {
  // Factors past the pyramid's range (plan/levels.ts: a level per factor of 2 above 2.5x),
  // prefilter=auto's cut-offs (the factor divided by 0.6..1), with and without a sigma.
  const cases: Array<[string, number, number, number]> = [
    ['bandlimit', 5, 0, 1], ['bandlimit', 5.54, 0, 1], ['bandlimit', 6.925 / 0.83, 0, 1],
    ['bandlimit', 13.1, 0, 2], ['bandlimit', 8, 2.4, 1], ['lanczos-3', 6, 0, 1], ['gaussian', 11, 0.7, 2],
  ];
  it.each(cases)('%s at %f, sigma %f, %i levels: the reference\'s table within 1e-12 of its peak', (name, scale, sigma, levels) => {
    const kernel = findKernel(name)!;
    const got = compensatedFilter(kernel, scale, sigma, levels);
    const want = reference(kernel, scale, sigma, levels);
    const xs = Array.from({ length: 4001 }, (_, i) => ((i - 2000) / 2000) * (got.support + 0.25));
    const peak = want(0);
    const worst = Math.max(...xs.map((x) => Math.abs(got.at(x) - want(x))));
    expect(worst).toBeLessThan(1e-12 * peak);
    // Outside the support both are exactly zero.
    expect([got.at(got.support + 0.1), want(got.support + 0.1)]).toEqual([0, 0]);
    // Not a table of zeros: the centre tap carries the filter.
    expect(got.at(0)).toBeGreaterThan(0);
  });
});

describe('compensatedFilter designs kept per (kernel, scale, sigma, levels)', () => {
  it('answers the one design for the same parameters and a new one for others', () => {
    const kernel = findKernel('bandlimit')!;
    const first = compensatedFilter(kernel, 5.54, 0, 1);
    // The y table of a plan that keeps the aspect asks the same design as its x table.
    expect(compensatedFilter(kernel, 5.54, 0, 1)).toBe(first);
    const other = compensatedFilter(kernel, 5.54 / 0.83, 0, 1);
    expect(other).not.toBe(first);
    expect(other.support).toBeGreaterThan(first.support);
    expect(compensatedFilter(findKernel('lanczos-3')!, 5.54, 0, 1)).not.toBe(first);
  });

  it('designs again, bit for bit, once a design has left the bounded store', () => {
    const kernel = findKernel('bandlimit')!;
    const kept = compensatedFilter(kernel, 7.25, 0, 1);
    const xs = Array.from({ length: 801 }, (_, i) => ((i - 400) / 400) * kept.support);
    const before = xs.map((x) => kept.at(x));
    // More designs than the store keeps push the first one out.
    for (let k = 0; k < 40; k++) compensatedFilter(kernel, 9 + k / 8, 0, 1);
    const again = compensatedFilter(kernel, 7.25, 0, 1);
    expect(again).not.toBe(kept);
    expect(xs.map((x) => again.at(x))).toEqual(before);
    expect(before.filter((v) => v !== 0).length).toBeGreaterThan(400);
  });
});

describe('cosineSum (turned cosines)', () => {
  it('equals the sum of Math.cos terms within 1e-13 of the sum of |a|, at every angle and phase', () => {
    let worst = 0;
    for (const len of [1, 17, 64, 65, 512, 1000]) {
      const a = Float64Array.from({ length: len }, (_, m) => Math.sin(m * 0.37) + 0.5);
      const scale = a.reduce((s, v) => s + Math.abs(v), 0);
      for (const t of [0, 1e-4, 0.01, 0.5, 1, Math.PI / 2, 3, Math.PI]) {
        for (const b of [0, 0.005, t / 2]) {
          let direct = 0;
          for (let m = 0; m < len; m++) direct += a[m] * Math.cos(b + m * t);
          worst = Math.max(worst, Math.abs(cosineSum(a, b, t) - direct) / scale);
        }
      }
    }
    expect(worst).toBeLessThan(1e-13);
  });
});
