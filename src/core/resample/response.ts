import type { Plan } from '../types.js';
import { planTable } from './axis-table.js';
import type { WeightTable } from './weights.js';
import { pyramidChainResponse } from './pyramid.js';
import { sampledRows } from './sampled-rows.js';

/** Output pixels sampled when averaging a table's response over its phases. */
const PHASES = 33;

const phasesOf = new WeakMap<WeightTable, Int32Array>();

/**
 * The output pixels a table's response is averaged over: up to PHASES, spread evenly over the
 * interior ones (taps clear of the border) when there are any. Computed once per table.
 */
function phases(t: WeightTable): Int32Array {
  const hit = phasesOf.get(t);
  if (hit) return hit;
  const interior: number[] = [];
  for (let o = 0; o < t.dstLen; o++) {
    const s = t.start[o];
    if (s > 0 && s + t.taps < t.srcLen) interior.push(o);
  }
  const pool = interior.length > 0 ? interior : Array.from({ length: t.dstLen }, (_, o) => o);
  const n = Math.min(PHASES, pool.length);
  const out = Int32Array.from({ length: n }, (_, i) => pool[Math.floor(((i + 0.5) * pool.length) / n)]);
  phasesOf.set(t, out);
  return out;
}

/**
 * Mean magnitude over sampled output pixels of sum_k w_k exp(-2 pi i f (j_k - c)), f in cycles
 * per input pixel of the table. Output pixels whose taps reach the border are skipped when
 * there are interior ones (clamped taps are not the filter's shape). The phase of tap k is the
 * first tap's turned k times by exp(-2 pi i f): two cosines per output pixel, not two per tap.
 */
export function tableResponse(t: WeightTable, f: number): number {
  const picked = phases(t);
  const n = picked.length;
  const dc = Math.cos(-2 * Math.PI * f);
  const ds = Math.sin(-2 * Math.PI * f);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const o = picked[i];
    const p = -2 * Math.PI * f * (t.start[o] - t.centre[o]);
    let c = Math.cos(p);
    let s = Math.sin(p);
    let re = 0;
    let im = 0;
    const base = o * t.taps;
    for (let k = 0; k < t.taps; k++) {
      const w = t.weights[base + k];
      re += w * c;
      im += w * s;
      const c2 = c * dc - s * ds;
      s = c * ds + s * dc;
      c = c2;
    }
    total += Math.hypot(re, im);
  }
  return n > 0 ? total / n : 0;
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

/**
 * Only the rows of the plan's final table that tableResponse averages over (sampled-rows.ts),
 * the same rows bit for bit, as a table whose rows are all its phases.
 */
function phaseRows(plan: Plan, axis: 'x' | 'y'): WeightTable {
  const ax = plan[axis];
  const [len, crop0, cropLen, dstLen] = axis === 'x'
    ? [plan.sourceWidth, plan.crop.x, plan.crop.width, plan.targetWidth]
    : [plan.sourceHeight, plan.crop.y, plan.crop.height, plan.targetHeight];
  const key = `${len}|${crop0}|${cropLen}|${dstLen}|${ax.kernel}|${ax.sigma}|${ax.pyramidLevels}|${ax.cutoff ?? 1}`;
  const hit = rowsKept.get(key);
  if (hit) return hit;
  const rows = sampledRows(plan, axis, phases);
  phasesOf.set(rows, Int32Array.from({ length: rows.dstLen }, (_, i) => i));
  rowsKept.set(key, rows);
  if (rowsKept.size > ROWS_KEPT) rowsKept.delete(rowsKept.keys().next().value!);
  return rows;
}

/** Sampled rows kept per axis setup (sources of one camera share their sizes, a ladder its widths). */
const ROWS_KEPT = 64;
const rowsKept = new Map<string, WeightTable>();

/**
 * planResponse bound to one plan: the PlanResponse the risk model (core/risk) reads, which
 * asks it at hundreds of frequencies. The same values, bit for bit (test/core/resample/
 * sampled-rows.test.ts); each axis's sampled rows are built once, and only those rows, not
 * the whole table (a thread that decides but does not render would build it for them alone).
 */
export function planResponseOf(plan: Plan): (axis: 'x' | 'y', f: number) => number {
  let tx: WeightTable | undefined;
  let ty: WeightTable | undefined;
  return (axis, f) => {
    if (!Number.isFinite(f)) throw new RangeError(`frequency must be finite, got ${f}`);
    const levels = plan[axis].pyramidLevels;
    const table = axis === 'x' ? (tx ??= phaseRows(plan, 'x')) : (ty ??= phaseRows(plan, 'y'));
    return tableResponse(table, f * 2 ** levels) * Math.abs(pyramidChainResponse(f, levels));
  };
}
