import { afterAll, describe, expect, it } from 'vitest';
import { makePlan, renderRaster, planResponse } from '../../../src/core/index.js';
import { reduceTable, pyramidResponse } from '../../../src/core/resample/pyramid.js';
import { setRingingLimited } from '../../../src/core/resample/limit.js';
import type { Plan } from '../../../src/core/types.js';
import { naturalField } from '../reference/natural.js';

const direct = (p: Plan): Plan => ({ ...p, x: { ...p.x, pyramidLevels: 0 }, y: { ...p.y, pyramidLevels: 0 } });

describe('Gaussian pyramid', () => {
  afterAll(() => setRingingLimited(true));
  it('reduces with the Burt & Adelson a = 0.375 kernel [1, 4, 6, 4, 1] / 16, centred on even pixels', () => {
    const t = reduceTable(40, true);
    expect(t.dstLen).toBe(20);
    expect(Array.from(t.weights.subarray(5 * t.taps, 6 * t.taps))).toEqual([1, 4, 6, 4, 1].map((v) => v / 16));
    expect(t.start[5]).toBe(8);
  });

  it('has the response a + cos(2 pi f) / 2 + (1/2 - a) cos(4 pi f), zero at Nyquist (Burt & Adelson 1983)', () => {
    expect(pyramidResponse(0)).toBeCloseTo(1, 12);
    expect(pyramidResponse(0.5)).toBeCloseTo(0, 12);
    for (const f of [0.1, 0.2, 0.3]) expect(pyramidResponse(f)).toBeCloseTo(Math.cos(Math.PI * f) ** 4, 12);
  });

  it('is planned for large factors only, leaving a factor >= 2.5 for the exact resample', () => {
    const levels = (s: number) => makePlan({ sourceWidth: 6400, sourceHeight: 6400, targetWidth: 6400 / s, targetHeight: 6400 / s, kernel: 'auto', prefilter: 'auto', light: 'linear' }).x.pyramidLevels;
    expect([2, 4, 5, 8, 10, 20, 64].map(levels)).toEqual([0, 0, 1, 1, 2, 3, 4]);
  });

  // The linear chain is compared with the ringing limiter off: the default kernel clamps each
  // pass to the range of its inputs (resample/limit.ts), and a pyramid level's inputs are
  // already smoothed, so with it on the two paths clamp a few samples differently at hard edges.
  it.each([[8, false], [5.3, false], [12, false], [5.3, true]] as const)(
    'agrees with the direct path at %fx on natural-looking content (limiter %s), response included',
    (s, limited) => {
      setRingingLimited(limited);
      const kernel = 'auto';
      const src = naturalField(512, 384, 11);
      const w = Math.round(512 / s), h = Math.round(384 / s);
      const plan = makePlan({ sourceWidth: 512, sourceHeight: 384, targetWidth: w, targetHeight: h, kernel, prefilter: 'auto', light: 'linear' });
      expect(plan.x.pyramidLevels).toBeGreaterThan(0);
      const a = renderRaster(src, plan).data;
      const b = renderRaster(src, direct(plan)).data;
      let sum = 0, worst = 0, n = 0, far = 0;
      for (let y = 4; y < h - 4; y++) {
        for (let i = (y * w + 4) * 3; i < (y * w + w - 4) * 3; i++) {
          const d = Math.abs(a[i] - b[i]);
          sum += d; worst = Math.max(worst, d); n++;
          if (d > 3) far++;
        }
      }
      // Tolerance: the compensated final filter matches the direct response to about 1e-3
      // (checked below) and the pyramid folds at most -41 dB of the band near its Nyquist
      // (plan/levels.ts), so inside the image the two agree to 1 code. The outer 4 output
      // pixels are left out: the last pyramid pixel sits on source pixel 2i, which is not the
      // last source pixel when the size is even, so the mirrored border differs slightly there.
      // With the limiter at 5.3x: measured mean 0.32 code, 2 % of samples beyond 3 codes.
      setRingingLimited(true);
      if (!limited) {
        expect(sum / n).toBeLessThanOrEqual(0.05);
        expect(worst).toBeLessThanOrEqual(1);
      } else {
        expect(sum / n).toBeLessThanOrEqual(0.4);
        expect(far / n).toBeLessThanOrEqual(0.04);
      }
      for (const r of [0, 0.25, 0.5, 0.8, 1, 1.3]) {
        const f = (r * 0.5) / plan.x.scale;
        expect(Math.abs(planResponse(plan, 'x', f) - planResponse(direct(plan), 'x', f))).toBeLessThanOrEqual(2e-3);
      }
    },
  );
});
