import { makePlan } from '../../../src/core/index.js';
import type { KernelChoice, LightMode, Plan, PrefilterChoice } from '../../../src/core/types.js';

/** A plan with the defaults a request without options gets. */
export function planFor(
  sw: number, sh: number, tw: number, th: number,
  opts: { kernel?: KernelChoice; prefilter?: PrefilterChoice; light?: LightMode } = {},
): Plan {
  return makePlan({
    sourceWidth: sw, sourceHeight: sh, targetWidth: tw, targetHeight: th,
    kernel: opts.kernel ?? 'auto', prefilter: opts.prefilter ?? 'auto', light: opts.light ?? 'linear',
  });
}
