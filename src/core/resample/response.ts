import type { Plan } from '../types.js';
import { planTable } from './axis-table.js';
import type { WeightTable } from './weights.js';
import { pyramidChainResponse } from './pyramid.js';

/** Output pixels sampled when averaging a table's response over its phases. */
const PHASES = 33;

/**
 * Mean magnitude over sampled output pixels of sum_k w_k exp(-2 pi i f (j_k - c)), f in cycles
 * per input pixel of the table. Output pixels whose taps reach the border are skipped when
 * there are interior ones (clamped taps are not the filter's shape).
 */
export function tableResponse(t: WeightTable, f: number): number {
  const interior: number[] = [];
  for (let o = 0; o < t.dstLen; o++) {
    const s = t.start[o];
    if (s > 0 && s + t.taps < t.srcLen) interior.push(o);
  }
  const pool = interior.length > 0 ? interior : Array.from({ length: t.dstLen }, (_, o) => o);
  const n = Math.min(PHASES, pool.length);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const o = pool[Math.floor(((i + 0.5) * pool.length) / n)];
    let re = 0;
    let im = 0;
    for (let k = 0; k < t.taps; k++) {
      const w = t.weights[o * t.taps + k];
      const p = -2 * Math.PI * f * (t.start[o] + k - t.centre[o]);
      re += w * Math.cos(p);
      im += w * Math.sin(p);
    }
    total += Math.hypot(re, im);
  }
  return total / n;
}

/**
 * Magnitude of the plan's effective filter along an axis at f cycles per source pixel, from
 * the very weight tables the render uses (pyramid stages included).
 */
export function planResponse(plan: Plan, axis: 'x' | 'y', f: number): number {
  if (!Number.isFinite(f)) throw new RangeError(`frequency must be finite, got ${f}`);
  const levels = plan[axis].pyramidLevels;
  return tableResponse(planTable(plan, axis), f * 2 ** levels) * Math.abs(pyramidChainResponse(f, levels));
}
