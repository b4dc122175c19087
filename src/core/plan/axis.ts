import type { AxisPlan, KernelName, PlanRequest } from '../types.js';
import { findKernel } from '../kernels/index.js';
import { autoSigma, ADAPTIVE_CAP } from './sigma.js';
import { pyramidLevelsFor } from './levels.js';

/** Upscales beyond this factor use Catmull-Rom: Lanczos-3's lobes become visible halos once
 * each lobe spans several output pixels (common practice). */
const LANCZOS_UPSCALE_LIMIT = 2;

/** The default kernel for a factor: the designed low-pass down, an interpolator up. */
export function autoKernel(scale: number): KernelName {
  if (scale > 1) return 'bandlimit';
  return 1 / scale <= LANCZOS_UPSCALE_LIMIT ? 'lanczos3' : 'catmull-rom';
}

/** One axis of the plan and a short phrase saying why. */
export function planAxis(
  extent: number,
  target: number,
  req: PlanRequest,
  adaptive: number,
): { axis: AxisPlan; why: string } {
  const scale = extent / target;
  const kernel = req.kernel === 'auto' ? autoKernel(scale) : req.kernel;
  const k = findKernel(kernel)!;
  const words: string[] = [];
  words.push(req.kernel === 'auto' ? `${kernel} (${scale > 1 ? 'downscale' : 'upscale'})` : `${kernel} (asked)`);
  let sigma: number;
  if (typeof req.prefilter === 'number') {
    sigma = req.prefilter;
    words.push(`sigma ${sigma} (asked)`);
  } else if (req.prefilter === 'none' || scale <= 1) {
    sigma = 0;
    if (scale <= 1 && req.prefilter === 'auto') words.push('no prefilter on upscale');
  } else {
    const planned = autoSigma(k, scale);
    sigma = planned;
    if (adaptive > 0) {
      const cap = ADAPTIVE_CAP * scale;
      // Blurs combine in quadrature (Lowe 2004, CHECKS.md).
      const combined = Math.sqrt(planned * planned + adaptive * adaptive);
      sigma = Math.min(cap, combined);
      words.push(`sigma raised by content to ${sigma.toFixed(2)}${combined > cap ? ' (capped)' : ''}`);
    }
  }
  const pyramidLevels = pyramidLevelsFor(k, scale);
  if (pyramidLevels > 0) words.push(`${pyramidLevels} pyramid level(s)`);
  return { axis: { scale, kernel, sigma, pyramidLevels }, why: words.join(', ') };
}
