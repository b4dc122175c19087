import type { AxisPlan, Plan } from '../types.js';
import { findKernel } from '../kernels/index.js';
import { stretchedFilter } from './filter.js';
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

/**
 * The final weight table of one axis: maps output pixel o to the source coordinate
 * x = crop0 + (o + 1/2) s - 1/2 (pixel centres at integers, no half-pixel shift), expressed on
 * the grid of the last pyramid level (x / 2^levels: level pixel i sits on source pixel
 * i 2^levels). Without a pyramid the filter is the kernel stretched by the factor, fused with
 * the Gaussian prefilter; after a pyramid it is designed so that the whole chain has that same
 * response (compensate.ts). Cached per
 * (sizes, crop, kernel, sigma, levels, cut-off); the cache holds at most 64 tables. A cut-off
 * factor c < 1 (prefilter=auto) stretches the kernel by 1/c more: its response becomes H(f / c).
 */
export function finalTable(
  srcLen: number,
  crop0: number,
  cropLen: number,
  dstLen: number,
  ax: AxisPlan,
): WeightTable {
  const cut = ax.cutoff !== undefined && ax.cutoff > 0 && ax.cutoff < 1 ? ax.cutoff : 1;
  const key = `${srcLen}|${crop0}|${cropLen}|${dstLen}|${ax.kernel}|${ax.sigma}|${ax.pyramidLevels}|${cut}`;
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
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
  const built = buildWeights(levelLength(srcLen, ax.pyramidLevels), dstLen, origin, step, filter);
  const table = kernel.limitsRinging ? { ...built, lobe: centralLobes(built) } : built;
  cache.set(key, table);
  if (cache.size > CACHE_LIMIT) cache.delete(cache.keys().next().value!);
  return table;
}

/** The final table of the plan's x or y axis. */
export function planTable(plan: Plan, axis: 'x' | 'y'): WeightTable {
  return axis === 'x'
    ? finalTable(plan.sourceWidth, plan.crop.x, plan.crop.width, plan.targetWidth, plan.x)
    : finalTable(plan.sourceHeight, plan.crop.y, plan.crop.height, plan.targetHeight, plan.y);
}
