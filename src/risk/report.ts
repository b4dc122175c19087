/**
 * One alias-risk report as the HTTP API answers it: the rendition the same query would produce
 * (same layout, same plan, the same content-adaptive prefilter), assessed against the source's
 * cached spectrum.
 */
import type { Limits } from '../config.js';
import type { RenditionLayout } from '../core/layout/index.js';
import { formatPlanHeader } from '../core/index.js';
import { adaptiveFilter, assessRisk, type RiskReport, type SourceSpectrum } from '../core/risk/index.js';
import type { AdaptiveFilter, Plan } from '../core/types.js';
import { planRendition } from '../rendition/plan.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { planResponseOf } from './adaptive.js';

export interface AssessedRendition {
  layout: RenditionLayout;
  plan: Plan;
  /** What prefilter=auto changed for this source (per-axis cut-off factors), if anything. */
  adaptive?: AdaptiveFilter;
  report: RiskReport;
}

/** Plans the query on the analysed source as the render path does, then assesses it. */
export function assessRendition(spectrum: SourceSpectrum, q: RenditionQuery, limits: Limits): AssessedRendition {
  const source = { width: spectrum.width, height: spectrum.height };
  const first = planRendition(source, q, limits);
  const adaptive = q.prefilter === 'auto' ? adaptiveFilter(spectrum, first.plan, planResponseOf(first.plan)) : undefined;
  const { layout, plan } = adaptive ? planRendition(source, q, limits, adaptive) : first;
  return { layout, plan, adaptive, report: assessRisk(spectrum, plan, planResponseOf(plan), q.density) };
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
