/** Plans and responses for the validation tests, built with the real planner and renderer. */
import { makePlan, planResponse } from '../../../src/core/index.js';
import type { Plan, PrefilterChoice, KernelChoice } from '../../../src/core/types.js';

/** A square plan from n x n to round(n / s) pixels. */
export function squarePlan(n: number, s: number, kernel: KernelChoice = 'auto', prefilter: PrefilterChoice = 'auto'): Plan {
  const t = Math.round(n / s);
  return makePlan({ sourceWidth: n, sourceHeight: n, targetWidth: t, targetHeight: t, kernel, prefilter, light: 'linear' });
}

/** Naive decimation: no prefilter, nearest neighbour (point sampling). */
export const naivePlan = (n: number, s: number) => squarePlan(n, s, 'nearest-neighbour', 'none');

/** The response the service hands to the risk model. */
export const responseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);

/**
 * A hand-made plan (plain data) of a width x height source shrunk by sx, sy, with prefilter
 * `sigma`; the model reads its filter from the response the test passes, not from this plan.
 */
export function handPlan(width: number, height: number, sx: number, sy = sx, sigma = 0): Plan {
  const axis = (scale: number) => ({ scale, kernel: 'nearest-neighbour', sigma, pyramidLevels: 0 });
  return {
    sourceWidth: width,
    sourceHeight: height,
    crop: { x: 0, y: 0, width, height },
    targetWidth: Math.round(width / sx),
    targetHeight: Math.round(height / sy),
    x: axis(sx),
    y: axis(sy),
    light: 'linear',
    reason: 'test',
  };
}
