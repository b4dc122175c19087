/**
 * One alias-risk report as the HTTP API answers it: the rendition the same query would produce
 * (same layout, same plan, the same content-adaptive prefilter), assessed against the source's
 * cached spectrum.
 */
import type { Limits } from '../config.js';
import { formatPlanHeader, planResponseOf } from '../core/index.js';
import { assessRisk, type RiskReport, type SourceSpectrum } from '../core/risk/index.js';
import { type PlannedRendition, planRendition } from '../rendition/plan.js';
import type { RenditionQuery } from '../schemas/rendition.js';

export interface AssessedRendition extends PlannedRendition {
  report: RiskReport;
}

/** Plans the query on the analysed source as the render path does, then assesses it. */
export function assessRendition(spectrum: SourceSpectrum, q: RenditionQuery, limits: Limits): AssessedRendition {
  const planned = planRendition({ width: spectrum.width, height: spectrum.height }, q, limits, () => spectrum);
  return { ...planned, report: assessRisk(spectrum, planned.plan, planResponseOf(planned.plan), q.density) };
}

/** The JSON body of GET /v1/alias-risk/{source}. */
export function riskBody(path: string, spectrum: SourceSpectrum, a: AssessedRendition) {
  const { layout, plan, report } = a;
  return {
    source: { path, width: spectrum.width, height: spectrum.height },
    target: { width: layout.targetWidth, height: layout.targetHeight },
    canvas: layout.canvas ?? null,
    scale: report.scale,
    nyquist: report.nyquist,
    plan: {
      header: formatPlanHeader(plan),
      crop: plan.crop,
      x: plan.x,
      y: plan.y,
      light: plan.light,
      adaptiveSigma: a.adaptive ? { x: a.adaptive.x, y: a.adaptive.y } : null,
      adaptiveCutoff: a.adaptive?.cutoff ?? null,
      reason: plan.reason,
    },
    folded: report.folded,
    score: report.score,
    level: report.level,
    margin: report.margin,
    viewing: report.viewing,
    cutoff: report.cutoff,
    patterns: report.patterns,
    advice: report.advice,
    peaks: report.peaks,
    grid: report.grid,
    recommendedSigma: report.recommendedSigma,
    reason: report.reason,
    analysis: { tileSize: spectrum.tileSize, tiles: spectrum.tiles },
    // Only for an animated source, so a still's report keeps its bytes.
    ...(spectrum.frames ? { animation: { frames: spectrum.frames, analysed: 'first frame' as const } } : {}),
  };
}
