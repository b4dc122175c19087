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
import type { RiskGrid } from './regions.js';
import type { WidthRisk } from './warnings.js';

export interface LadderStep extends WidthRisk {
  height: number;
  /** The plan the render service will use (content-adaptive sigma included). */
  plan: Plan;
  report: RiskReport;
}

/** A PlanResponse (core/risk) read from the plan's own weight tables. */
const responseOf = (plan: Plan) => (axis: 'x' | 'y', f: number) => planResponse(plan, axis, f);

/**
 * Where the folded energy is, region by region: the grid's folded fraction times the region's
 * own spectral energy, scaled to 0..1. A region of flat colour that a tile barely reaches may
 * fold a large fraction of almost nothing; what shows as moiré is the folded energy itself.
 */
function foldedEnergyGrid(spectrum: SourceSpectrum, report: RiskReport): RiskGrid {
  const { columns, rows, bins, power } = spectrum.grid;
  const cells = new Array<number>(columns * rows).fill(0);
  const per = bins * bins;
  let max = 0;
  for (let r = 0; r < columns * rows; r++) {
    let energy = 0;
    for (let c = 0; c < per; c++) energy += power[r * per + c];
    cells[r] = (report.grid.folded[r] ?? 0) * energy;
    max = Math.max(max, cells[r]);
  }
  return { columns, rows, cells: max > 0 ? cells.map((v) => v / max) : cells };
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
      grid: foldedEnergyGrid(spectrum, report),
      periodic: isPeriodic(report),
      remedySigma: report.level === 'low' ? undefined : Math.max(report.recommendedSigma.x, report.recommendedSigma.y),
      plan,
      report,
    };
  });
}
