/**
 * The content-adaptive filter of the render path: prefilter=auto asks the visibility model for
 * per-axis cut-off factors on sources whose planned rendition would show a false pattern
 * (src/core/risk: adaptiveFilter), using the kept spectrum of that source version. Both the
 * analysis and the decision run in the pool's threads (src/pool/analysis.ts): tens of
 * milliseconds each for a large source, which the event loop must not wait through.
 */
import { planResponse } from '../core/index.js';
import type { Plan } from '../core/types.js';
import type { RenderPool } from '../pool/render-pool.js';
import { type AdaptivePrefilter, shrinks } from '../rendition/prefilter.js';
import type { SpectrumStore } from './spectrum-store.js';

/** A PlanResponse (core/risk) read from the plan's own weight tables. */
export const planResponseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);

/** The render context's prefilter=auto hooks, backed by `store` and `pool`. */
export function adaptivePrefilter(store: SpectrumStore, pool: RenderPool): AdaptivePrefilter {
  return {
    async known(plan, identity, signal) {
      if (!shrinks(plan)) return { filter: undefined };
      const spectrum = await store.lookup(identity);
      return spectrum ? { filter: await pool.adapt(spectrum, plan, signal) } : null;
    },
    async analyse(src, plan, identity, signal) {
      if (!shrinks(plan)) return undefined;
      const { spectrum, filter } = await pool.analyse(src, plan, signal);
      // Kept in memory at once; the shared tiers are written in the background.
      void store.keep(identity, spectrum);
      return filter;
    },
  };
}
