/**
 * The alias risk of every width of a ladder, from one spectrum analysis of the source: the
 * spectrum is estimated once, then each width's plan is checked against it (cheap), and the
 * report is turned into what the warnings need (where, what a viewer sees, what avoids it and
 * at what cost), in the visibility model's words.
 */
import type { Limits } from '../config.js';
import type { RiskReport, SourceSpectrum } from '../core/risk/index.js';
import type { Plan } from '../core/types.js';
import { assessRendition } from './report.js';
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
 * The region grid for naming where the false pattern shows: the model's per-region margins in
 * threshold units (core/risk/grid.ts), scaled to 0..1 by the strongest region, so "hot" means
 * at least half as visible as the worst region.
 */
function marginGrid(grid: RiskReport['grid']): RiskGrid {
  const max = Math.max(0, ...grid.margins);
  return { columns: grid.columns, rows: grid.rows, cells: max > 0 ? grid.margins.map((m) => Math.max(0, m) / max) : grid.margins.map(() => 0) };
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

/** What a warning needs to know about one width, from its risk report. */
export function widthRisk(width: number, report: RiskReport): WidthRisk {
  const top = report.patterns.find((p) => p.kind !== 'clean');
  return {
    width,
    level: report.level,
    score: report.score,
    grid: marginGrid(report.grid),
    periodic: top ? top.source === 'line' : isPeriodic(report),
    pattern: top?.description,
    advice: report.advice[0],
    left: report.level === 'low' ? undefined : report.reason.split('; ').find((p) => p.startsWith('prefilter=auto ') || p.startsWith('the rendition does not shrink')),
    remedySigma: report.level === 'low' ? undefined : Math.max(report.recommendedSigma.x, report.recommendedSigma.y),
  };
}

/**
 * Each query planned and assessed exactly as GET /v1/alias-risk does it (src/risk/report.ts:
 * the render path's layout and plan, its content-adaptive prefilter), against one spectrum.
 */
export function assessLadder(
  spectrum: SourceSpectrum,
  queries: ReadonlyArray<{ width: number; query: RenditionQuery }>,
  limits: Limits,
): LadderStep[] {
  return queries.map(({ width, query }) => {
    const { layout, plan, report } = assessRendition(spectrum, query, limits);
    return { ...widthRisk(width, report), height: layout.targetHeight, plan, report };
  });
}
