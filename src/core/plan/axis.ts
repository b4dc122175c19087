import type { AxisPlan, KernelName, PlanRequest } from '../types.js';
import { findKernel } from '../kernels/index.js';
import { prefilterSigma } from './sigma.js';
import { pyramidLevelsFor } from './levels.js';

/** Upscales beyond this factor use Catmull-Rom: Lanczos-3's lobes become visible halos once
 * each lobe spans several output pixels (common practice). */
const LANCZOS_UPSCALE_LIMIT = 2;

/** The default kernel for a factor: the designed low-pass down, an interpolator up. */
export function autoKernel(scale: number): KernelName {
  if (scale > 1) return 'bandlimit';
  return 1 / scale <= LANCZOS_UPSCALE_LIMIT ? 'lanczos-3' : 'catmull-rom';
}

/** One axis of the plan and a short phrase saying why. */
export function planAxis(
  extent: number,
  target: number,
  req: PlanRequest,
  adaptive: number,
  adaptiveCutoff = 1,
): { axis: AxisPlan; why: string } {
  const scale = extent / target;
  const kernel = req.kernel === 'auto' ? autoKernel(scale) : req.kernel;
  const k = findKernel(kernel)!;
  const words: string[] = [];
  const what = scale > 1 ? 'downscale, low-pass at the new Nyquist' : scale < 1 ? 'upscale, interpolating' : 'same size';
  words.push(req.kernel === 'auto' ? `${kernel} (${what})` : `${kernel} (asked)`);
  const pre = prefilterSigma(req.prefilter, scale, adaptive);
  if (pre.why) words.push(pre.why);
  const sigma = pre.sigma;
  const pyramidLevels = pyramidLevelsFor(k, scale);
  if (pyramidLevels > 0) words.push(`${pyramidLevels} pyramid level(s)`);
  const axis: AxisPlan = { scale, kernel, sigma, sigmaFrom: pre.from, pyramidLevels };
  // prefilter=auto's lowered cut-off applies to a stretched kernel on a shrinking axis only.
  if (req.prefilter === 'auto' && k.stretch && scale > 1 && adaptiveCutoff > 0 && adaptiveCutoff < 1) {
    axis.cutoff = adaptiveCutoff;
    axis.sigmaFrom = 'content';
    words.push(`cut-off lowered by content to ${adaptiveCutoff.toFixed(2)}x`);
  }
  return { axis, why: words.join(', ') };
}
