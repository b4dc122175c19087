/**
 * The alias risk of every width of a ladder, from one spectrum analysis of the source: the
 * spectrum is estimated once, then each width's plan is checked against it (cheap).
 */
import type { Limits } from '../config.js';
import { planResponse } from '../core/index.js';
import { assessRisk, type RiskReport, type SourceSpectrum } from '../core/risk/index.js';
import type { PixelRaster, Plan } from '../core/types.js';
import { planRendition } from '../render/plan.js';
import type { RenderContext } from '../render/service.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { WidthRisk } from './warnings.js';

export interface LadderStep extends WidthRisk {
  height: number;
  report: RiskReport;
}

/** A PlanResponse (core/risk) read from the plan's own weight tables. */
const responseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);

/** Whether the folding that remains is mostly one periodic pattern (a weave, a stripe). */
function isPeriodic(report: RiskReport): boolean {
  let best: RiskReport['peaks'][number] | undefined;
  for (const p of report.peaks) if (!best || p.power * p.passed > best.power * best.passed) best = p;
  return best?.kind === 'periodic';
}

/**
 * Plans each query as the render service will (the same layout, and the same content-adaptive
 * prefilter when `adaptive` is wired), then assesses its alias risk against `spectrum`.
 */
export function assessLadder(
  raster: PixelRaster,
  spectrum: SourceSpectrum,
  queries: ReadonlyArray<{ width: number; query: RenditionQuery }>,
  limits: Limits,
  adaptive?: RenderContext['adaptiveSigma'],
): LadderStep[] {
  return queries.map(({ width, query }) => {
    const first = planRendition(raster, query, limits);
    const sigma = query.prefilter === 'auto' ? adaptive?.(raster, first.layout) : undefined;
    const { layout, plan } = sigma ? planRendition(raster, query, limits, sigma) : first;
    const report = assessRisk(spectrum, plan, responseOf(plan));
    return {
      width,
      height: layout.targetHeight,
      level: report.level,
      score: report.score,
      grid: report.grid,
      periodic: isPeriodic(report),
      remedySigma: report.level === 'low' ? undefined : Math.max(report.recommendedSigma.x, report.recommendedSigma.y),
      report,
    };
  });
}
