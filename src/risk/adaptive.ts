/**
 * The content-adaptive filter of the render path: prefilter=auto asks the visibility model for
 * per-axis cut-off factors on sources whose planned rendition would show a false pattern
 * (src/core/risk: adaptiveFilter), using the cached spectrum of that source version. The hooks
 * keep the render context's `{ x, y }` shape (extra sigma, 0 here) and carry the cut-offs in it.
 */
import { planResponse } from '../core/index.js';
import { adaptiveFilter } from '../core/risk/index.js';
import type { AdaptiveFilter, PixelRaster, Plan } from '../core/types.js';
import type { SourceIdentity } from '../origins/types.js';
import type { SpectrumStore } from './spectrum-store.js';

/** A PlanResponse (core/risk) read from the plan's own weight tables. */
export const planResponseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);

/**
 * The render context's adaptiveSigma hook, backed by `store`. A plan that shrinks neither axis
 * cannot fold anything, so it never costs an analysis.
 */
export function adaptiveHook(store: SpectrumStore) {
  return (raster: PixelRaster, plan: Plan, identity?: SourceIdentity): AdaptiveFilter | undefined =>
    plan.x.scale > 1 || plan.y.scale > 1
      ? adaptiveFilter(store.ofRaster(raster, identity), plan, planResponseOf(plan))
      : undefined;
}

/**
 * The render context's knownAdaptiveSigma hook: the same answer as adaptiveHook's, from the
 * spectrum this process already holds for the source version, so the render can start before
 * the source is decoded; null when that spectrum is not at hand (the pixels are needed first).
 */
export function knownAdaptiveHook(store: SpectrumStore) {
  return (plan: Plan, identity: SourceIdentity): { sigma: AdaptiveFilter | undefined } | null => {
    if (!(plan.x.scale > 1 || plan.y.scale > 1)) return { sigma: undefined };
    const spectrum = store.known(identity);
    return spectrum ? { sigma: adaptiveFilter(spectrum, plan, planResponseOf(plan)) } : null;
  };
}
