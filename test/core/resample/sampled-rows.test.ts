import { describe, expect, it } from 'vitest';
import { makePlan, planResponse, planResponseOf } from '../../../src/core/index.js';
import type { KernelChoice, Plan } from '../../../src/core/types.js';
import { planTable } from '../../../src/core/resample/axis-table.js';
import { sampledRows } from '../../../src/core/resample/sampled-rows.js';

/**
 * The decision's sampled response reads only the rows it averages over (sampled-rows.ts); the
 * reference is the whole table the render uses (axis-table.ts) and planResponse over it. Both
 * must agree bit for bit: prefilter=auto's decisions and the alias-risk figures come from it.
 */
function planOf(w: number, h: number, tw: number, th: number, kernel: KernelChoice, extra: Partial<Plan['x']> = {}, crop?: Plan['crop']): Plan {
  const plan = makePlan({ sourceWidth: w, sourceHeight: h, targetWidth: tw, targetHeight: th, kernel, prefilter: 'auto', light: 'linear', ...(crop ? { crop } : {}) });
  return { ...plan, x: { ...plan.x, ...extra }, y: { ...plan.y, ...extra } };
}

// Factors with and without a pyramid, prefilter=auto's lowered cut-offs, a sigma (tabulated
// filter), other kernels, a cover crop, and outputs too small to have rows clear of the border.
const plans: Array<[string, Plan]> = [
  ['4 MP to 800, designed kernel', planOf(2304, 1728, 800, 600, 'auto')],
  ['14.7 MP to 800, a pyramid level', planOf(4432, 3324, 800, 600, 'auto')],
  ['14.7 MP to 640, cut-off 0.83', planOf(4432, 3324, 640, 480, 'auto', { cutoff: 0.83 })],
  ['12 MP to 300, two levels, cut-off 0.6', planOf(4000, 3000, 300, 225, 'auto', { cutoff: 0.6 })],
  ['lanczos-3 with a sigma of 1.3', planOf(3000, 2000, 700, 467, 'lanczos-3', { sigma: 1.3 })],
  ['mitchell-netravali at 2.2x', planOf(2200, 1400, 1000, 636, 'mitchell-netravali')],
  ['a cover crop', planOf(3000, 2000, 500, 500, 'auto', {}, { x: 500, y: 0, width: 2000, height: 2000 })],
  ['an output of 4 px', planOf(640, 480, 4, 3, 'auto')],
  ['an upscale', planOf(200, 150, 640, 480, 'auto')],
];

describe('sampledRows', () => {
  it.each(plans)('%s: each row is the whole table\'s row, bit for bit', (_, plan) => {
    for (const axis of ['x', 'y'] as const) {
      const whole = planTable(plan, axis);
      const picked = Int32Array.from({ length: Math.min(33, whole.dstLen) }, (_, i) => Math.floor(((i + 0.5) * whole.dstLen) / Math.min(33, whole.dstLen)));
      const rows = sampledRows(plan, axis, () => picked);
      expect(rows.taps).toBe(whole.taps);
      expect(rows.dstLen).toBe(picked.length);
      for (let i = 0; i < picked.length; i++) {
        const o = picked[i];
        expect(rows.start[i]).toBe(whole.start[o]);
        expect(rows.centre[i]).toBe(whole.centre[o]);
        const got = Array.from(rows.weights.subarray(i * rows.taps, (i + 1) * rows.taps));
        const want = Array.from(whole.weights.subarray(o * whole.taps, (o + 1) * whole.taps));
        expect(got).toEqual(want);
      }
    }
  });
});

describe('planResponseOf (sampled rows) against planResponse (the whole table)', () => {
  it.each(plans)('%s: the same response at every frequency', (_, plan) => {
    // The second binding reads the rows kept from the first (response.ts keeps them per axis setup).
    planResponseOf(plan)('x', 0.25);
    const fast = planResponseOf({ ...plan });
    const fs = Array.from({ length: 257 }, (_, k) => k / 512).concat([0.0123, 0.1666, 0.333, 0.4999]);
    for (const axis of ['x', 'y'] as const) {
      const differ = fs.filter((f) => !Object.is(fast(axis, f), planResponse(plan, axis, f)));
      expect(differ).toEqual([]);
      // A low-pass: passes DC (the weights sum to 1) and its response is not flat.
      expect(fast(axis, 0)).toBeCloseTo(1, 6);
      if (plan[axis].scale > 1) expect(fast(axis, 0.5)).toBeLessThan(0.5);
    }
  });
});
