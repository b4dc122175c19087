import type { AxisPlan, Plan } from '../types.js';
import { findKernel } from '../kernels/index.js';
import { type AxisFilter, stretchedFilter } from './filter.js';
import { compensatedFilter } from './compensate.js';
import { buildWeights, type WeightTable } from './weights.js';
import { centralLobes } from './limit.js';

/** Length of an axis after `levels` pyramid reductions (pixel i of a level sits at 2i below). */
export function levelLength(n: number, levels: number): number {
  let m = n;
  for (let l = 0; l < levels; l++) m = Math.ceil(m / 2);
  return m;
}

const CACHE_LIMIT = 64;
const cache = new Map<string, WeightTable>();

/** prefilter=auto's cut-off factor of an axis, 1 when it has none. */
const cutOf = (ax: AxisPlan): number => (ax.cutoff !== undefined && ax.cutoff > 0 && ax.cutoff < 1 ? ax.cutoff : 1);

/** The final stage of one axis as finalTable sets it up: its grid, centres and filter. */
export interface FinalStage {
  /** Length of the last pyramid level, the grid the final table reads. */
  srcLen: number;
  dstLen: number;
  /** Centre of output pixel o, in that grid: origin + o * step. */
  origin: number;
  step: number;
  filter: AxisFilter;
  /** The kernel limits ringing (limit.ts): the table gets its central lobes. */
  limitsRinging: boolean;
}

/**
 * The setup of finalTable's table: output pixel o maps to the source coordinate
 * x = crop0 + (o + 1/2) s - 1/2 (pixel centres at integers, no half-pixel shift), expressed on
 * the grid of the last pyramid level (x / 2^levels: level pixel i sits on source pixel
 * i 2^levels). Without a pyramid the filter is the kernel stretched by the factor, fused with
 * the Gaussian prefilter; after a pyramid it is designed so that the whole chain has that same
 * response (compensate.ts). A cut-off factor c < 1 (prefilter=auto) stretches the kernel by
 * 1/c more: its response becomes H(f / c).
 */
export function finalStage(srcLen: number, crop0: number, cropLen: number, dstLen: number, ax: AxisPlan): FinalStage {
  const cut = cutOf(ax);
  const kernel = findKernel(ax.kernel);
  if (!kernel) throw new RangeError(`unknown kernel ${ax.kernel}`);
  const scale = cropLen / dstLen;
  const unit = 2 ** ax.pyramidLevels;
  const step = scale / unit;
  const stretch = kernel.stretch && step > 1 ? step / cut : 1;
  const filter =
    ax.pyramidLevels > 0
      ? compensatedFilter(kernel, scale / cut, ax.sigma, ax.pyramidLevels)
      : stretchedFilter(kernel, stretch, ax.sigma);
  const origin = (crop0 + 0.5 * scale - 0.5) / unit;
  return { srcLen: levelLength(srcLen, ax.pyramidLevels), dstLen, origin, step, filter, limitsRinging: kernel.limitsRinging === true };
}

/**
 * The final weight table of one axis, set up by finalStage. Cached per (sizes, crop, kernel,
 * sigma, levels, cut-off); the cache holds at most 64 tables.
 */
export function finalTable(
  srcLen: number,
  crop0: number,
  cropLen: number,
  dstLen: number,
  ax: AxisPlan,
): WeightTable {
  const key = `${srcLen}|${crop0}|${cropLen}|${dstLen}|${ax.kernel}|${ax.sigma}|${ax.pyramidLevels}|${cutOf(ax)}`;
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const stage = finalStage(srcLen, crop0, cropLen, dstLen, ax);
  const built = buildWeights(stage.srcLen, dstLen, stage.origin, stage.step, stage.filter);
  const table = stage.limitsRinging ? { ...built, lobe: centralLobes(built) } : built;
  cache.set(key, table);
  if (cache.size > CACHE_LIMIT) cache.delete(cache.keys().next().value!);
  return table;
}

/** The arguments of finalTable and finalStage for the plan's x or y axis. */
const axisOf = (plan: Plan, axis: 'x' | 'y') =>
  axis === 'x'
    ? ([plan.sourceWidth, plan.crop.x, plan.crop.width, plan.targetWidth, plan.x] as const)
    : ([plan.sourceHeight, plan.crop.y, plan.crop.height, plan.targetHeight, plan.y] as const);

/** The final stage of the plan's x or y axis (finalStage). */
export function planStage(plan: Plan, axis: 'x' | 'y'): FinalStage {
  return finalStage(...axisOf(plan, axis));
}

/** The final table of the plan's x or y axis. */
export function planTable(plan: Plan, axis: 'x' | 'y'): WeightTable {
  return finalTable(...axisOf(plan, axis));
}
