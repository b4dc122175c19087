/**
 * The rows of a plan's final weight table that its response is averaged over (response.ts),
 * built alone: a decision reads the response of up to 33 output pixels, and building the
 * whole table for them (every output pixel's taps through the kernel: 16 ms for a 4 MP source
 * to 800 px with the designed kernel, in a thread that does not render) was most of its cost.
 *
 * Each row is the very row finalTable (axis-table.ts) stores, bit for bit: the filter, origin
 * and step are finalTable's own (planStage), the table's shape (taps, first taps) comes
 * from buildWeights run with a constant filter of the same support (the shape depends on the
 * support only), and each picked row is buildWeights' own row for that one centre. A row clear
 * of the border reads input indices start .. start + n - 1 unmirrored, so the one-row table
 * holds the same weights, summed and normalised in the same order, and the whole table's row
 * only adds zero taps after them. test/core/resample/sampled-rows.test.ts checks the rows and
 * the responses against the whole table's.
 */
import type { Plan } from '../types.js';
import { planStage, planTable } from './axis-table.js';
import { buildWeights, type WeightTable } from './weights.js';

/**
 * The rows `pick` chooses of the plan's final table for `axis`, as a table of their own (row
 * i is the picked row i, with the whole table's taps). When a picked row touches the border
 * (an output too small to have rows clear of it), the whole table is built and its rows taken.
 * `pick` sees the whole table's shape (srcLen, dstLen, taps, start, centre; weights are not
 * those of the plan) and returns output pixel indices.
 */
export function sampledRows(plan: Plan, axis: 'x' | 'y', pick: (shape: WeightTable) => Int32Array): WeightTable {
  const stage = planStage(plan, axis);
  const { srcLen, step, filter } = stage;
  const shape = buildWeights(srcLen, stage.dstLen, stage.origin, step, { support: filter.support, at: () => 1 });
  const rows = pick(shape);
  const { taps } = shape;
  const start = new Int32Array(rows.length);
  const centre = new Float64Array(rows.length);
  const weights = new Float32Array(rows.length * taps);
  const clear = rows.every((o) => shape.start[o] > 0 && shape.start[o] + taps < srcLen);
  const whole = clear ? undefined : planTable(plan, axis);
  for (let i = 0; i < rows.length; i++) {
    const o = rows[i];
    start[i] = shape.start[o];
    centre[i] = shape.centre[o];
    if (whole) {
      weights.set(whole.weights.subarray(o * taps, (o + 1) * taps), i * taps);
    } else {
      // The one-row table of centre c: buildWeights puts its centre at c + 0 * step = c.
      const one = buildWeights(srcLen, 1, centre[i], step, filter);
      if (one.start[0] !== start[i]) throw new Error(`sampled row ${o} starts at ${one.start[0]}, the table's at ${start[i]}`);
      weights.set(one.weights, i * taps);
    }
  }
  // The fields in buildWeights' order: one object shape for the tables tableResponse reads.
  return { srcLen, dstLen: rows.length, taps, start, weights, centre };
}
