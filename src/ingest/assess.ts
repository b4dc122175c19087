/**
 * The alias risk of every width of a ladder, from one spectrum analysis of the source: the
 * spectrum is estimated once, then each width's plan is checked against it (cheap).
 */
import type { Limits } from '../config.js';
import { assessRisk, CEIL_DB, FLOOR_DB, type RiskReport, type SourceSpectrum } from '../core/risk/index.js';
import type { PixelRaster, Plan } from '../core/types.js';
import type { SourceIdentity } from '../origins/types.js';
import { planRendition } from '../render/plan.js';
import type { RenderContext } from '../render/service.js';
import { planResponseOf } from '../risk/adaptive.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { RiskGrid } from './regions.js';
import type { WidthRisk } from './warnings.js';

export interface LadderStep extends WidthRisk {
  height: number;
  /** The plan the render service will use (content-adaptive sigma included). */
  plan: Plan;
  report: RiskReport;
}

/**
 * The region grid on a linear energy scale, for naming where the moiré is: the report's cell
 * scores are folded energy (against the source's mean) in dB mapped onto 0..1 between FLOOR_DB
 * and CEIL_DB (core/risk/score.ts), so 10^(dB / 10) undoes the mapping. "Hot" then means at
 * least half the strongest region's folded energy, not half its decibels. Scaled to 0..1.
 */
function linearGrid(grid: RiskReport['grid']): RiskGrid {
  const energy = grid.cells.map((score) => (score > 0 ? 10 ** ((FLOOR_DB + score * (CEIL_DB - FLOOR_DB)) / 10) : 0));
  const max = Math.max(0, ...energy);
  return { columns: grid.columns, rows: grid.rows, cells: max > 0 ? energy.map((e) => e / max) : energy };
}

/**
 * Whether the folding that remains is mostly periodic (a weave, a stripe: moiré) rather than
 * broadband (edges, grain: jaggies): the periodic peaks, after the planned filter, carry at
 * least half of the folded energy.
 */
function isPeriodic(report: RiskReport): boolean {
  let periodic = 0;
  for (const p of report.peaks) if (p.kind === 'periodic') periodic += p.power * p.passed;
  return report.folded.planned > 0 && periodic >= 0.5 * report.folded.planned;
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
  identity?: SourceIdentity,
): LadderStep[] {
  return queries.map(({ width, query }) => {
    const first = planRendition(raster, query, limits);
    const sigma = query.prefilter === 'auto' ? adaptive?.(raster, first.plan, identity) : undefined;
    const { layout, plan } = sigma ? planRendition(raster, query, limits, sigma) : first;
    const report = assessRisk(spectrum, plan, planResponseOf(plan));
    return {
      width,
      height: layout.targetHeight,
      level: report.level,
      score: report.score,
      grid: linearGrid(report.grid),
      periodic: isPeriodic(report),
      remedySigma: report.level === 'low' ? undefined : Math.max(report.recommendedSigma.x, report.recommendedSigma.y),
      plan,
      report,
    };
  });
}
