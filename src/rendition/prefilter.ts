import type { AdaptiveFilter, Plan } from '../core/types.js';
import type { SourceIdentity } from '../origins/types.js';
import type { SharedRaster, SpooledRaster } from '../pool/worker.js';

/**
 * prefilter=auto's content-adaptive filter as the render path asks for it; src/risk/service.ts
 * answers, with the spectrum store and the pool's threads (never the event loop).
 */
export interface AdaptivePrefilter {
  /**
   * The filter for `plan` from the spectrum kept for this source version (in memory or a shared
   * cache tier), or null when none is kept (the source must be analysed).
   */
  known(plan: Plan, identity: SourceIdentity, signal?: AbortSignal): Promise<{ filter: AdaptiveFilter | undefined } | null>;
  /** Analyses a staged source (shared memory, or a spool file fully written), keeps its spectrum, and decides for `plan`. */
  analyse(src: SharedRaster | SpooledRaster, plan: Plan, identity: SourceIdentity, signal?: AbortSignal): Promise<AdaptiveFilter | undefined>;
}

/** A plan that shrinks neither axis cannot fold anything: it never costs an analysis. */
export const shrinks = (plan: Plan): boolean => plan.x.scale > 1 || plan.y.scale > 1;
