import type { Plan } from '../types.js';

function pair(a: string, b: string): string {
  return a === b ? a : `${a},${b}`;
}

/**
 * Value of the `Rendition-Plan` response header, e.g.
 * `scale=5.000,5.000; kernel=bandlimit; sigma=1.75,1.75; prefilter=content; pyramid=1,1; light=linear`.
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
    `light=${plan.light}`,
  ].join('; ');
}
