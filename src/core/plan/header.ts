import type { Plan } from '../types.js';

function pair(a: string, b: string): string {
  return a === b ? a : `${a},${b}`;
}

/**
 * Value of the `Rendition-Plan` response header, e.g.
 * `scale=5.000,5.000; kernel=bandlimit; sigma=0.00,0.00; prefilter=kernel; pyramid=1,1; cutoff=1.00,0.76; light=linear`.
 * `cutoff` is the factor on each axis's kernel cut-off (prefilter=auto lowers it where a false
 * pattern would show; 1.00 = the kernel's own).
 * Kernel names and the sigma's origin (`prefilter`: kernel, content, asked, none) collapse to
 * one when both axes agree; `prefilter=content` says the alias-risk analysis raised sigma.
 */
export function formatPlanHeader(plan: Plan): string {
  const { x, y } = plan;
  return [
    `scale=${x.scale.toFixed(3)},${y.scale.toFixed(3)}`,
    `kernel=${pair(x.kernel, y.kernel)}`,
    `sigma=${x.sigma.toFixed(2)},${y.sigma.toFixed(2)}`,
    `prefilter=${pair(x.sigmaFrom ?? 'kernel', y.sigmaFrom ?? 'kernel')}`,
    `pyramid=${x.pyramidLevels},${y.pyramidLevels}`,
    `cutoff=${(x.cutoff ?? 1).toFixed(2)},${(y.cutoff ?? 1).toFixed(2)}`,
    `light=${plan.light}`,
  ].join('; ');
}
