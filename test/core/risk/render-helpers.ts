/** Plans and responses for the validation tests, built with the real planner and renderer. */
import { makePlan, planResponse } from '../../../src/core/index.js';
import type { Plan, PrefilterChoice, KernelChoice } from '../../../src/core/types.js';

/** A square plan from n x n to round(n / s) pixels. */
export function squarePlan(n: number, s: number, kernel: KernelChoice = 'auto', prefilter: PrefilterChoice = 'auto'): Plan {
  const t = Math.round(n / s);
  return makePlan({ sourceWidth: n, sourceHeight: n, targetWidth: t, targetHeight: t, kernel, prefilter, light: 'linear' });
}

/** Naive decimation: no prefilter, nearest neighbour (point sampling). */
export const naivePlan = (n: number, s: number) => squarePlan(n, s, 'nearest', 'none');

/** The response the service hands to the risk model. */
export const responseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);
