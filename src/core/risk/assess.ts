/**
 * The alias-risk report of one rendition plan against one source spectrum: what a viewer
 * would see (see.ts: false patterns in contrast-threshold units), the folded energy (model.ts)
 * and where it sits (grid.ts), and prefilter=auto's per-axis cut-off (cutoff.ts).
 */
import type { AdaptiveFilter, Plan } from '../types.js';
import type { SourceSpectrum } from '../spectrum/index.js';
import { adviceFor, evenedWords, type Advice } from './advice.js';
import { cropRatio, cropWeights } from './crop.js';
import { viewingAt, type Viewing } from './csf.js';
import { autoCutoff, CUT_MIN, sampledGain } from './cutoff.js';
import { sampleResponse, withExtraBlur, type PlanResponse } from './filter.js';
import { regionFoldings, regionRisk, type RiskGrid } from './grid.js';
import { PLAIN_MARGIN, VISIBLE_MARGIN, visibilityScore } from './levels.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction, nyquistOf } from './model.js';
import { findPeaks, type RiskPeak } from './peaks.js';
import { blurForTarget, extraSigmaFor, foldedWithBlur, type FoldSetup } from './recommend.js';
import { LOW_FRACTION, type RiskLevel } from './score.js';
import { sceneOf, see } from './see.js';
import type { Gain, VisiblePattern } from './visibility.js';

/** Alias risk of one rendition. Frequencies in source cycles per pixel unless said otherwise. */
export interface RiskReport {
  nyquist: { x: number; y: number };
  scale: { x: number; y: number };
  /** Share of the non-DC energy that folds back, with no prefilter and with the planned filter. */
  folded: { unfiltered: number; planned: number };
  /** visibilityScore of the strongest false pattern's margin (0..1; 0.5 = just visible). */
  score: number;
  /** low: nothing a viewer will see; moderate: faint, on close inspection; high: plainly visible. */
  level: RiskLevel;
  /** Every false pattern (and strong clean line), strongest first. */
  patterns: VisiblePattern[];
  /** Largest margin of any false pattern, in threshold units. */
  margin: number;
  viewing: Viewing;
  /** Factor on the kernel's cut-off per axis in this plan (1 = the kernel's own). */
  cutoff: { x: number; y: number };
  advice: Advice[];
  /** Strongest peaks beyond the new Nyquist in the whole source's spectrum. */
  peaks: RiskPeak[];
  grid: RiskGrid;
  /** Total Gaussian sigma per axis (source px) that brings the folded energy under -40 dB. */
  recommendedSigma: { x: number; y: number };
  reason: string;
}

const TARGET = 0.9 * LOW_FRACTION;

function setupOf(spec: SourceSpectrum, plan: Plan, response: PlanResponse): FoldSetup {
  const scale = { x: plan.x.scale, y: plan.y.scale };
  if (!(scale.x > 0 && scale.y > 0)) throw new RangeError('plan scales must be positive');
  const n = spec.tileSize;
  const sampled = n === 0
    ? { x: new Float64Array(1), y: new Float64Array(1) }
    : { x: sampleResponse(response, 'x', n), y: sampleResponse(response, 'y', n) };
  const nyquist = { x: nyquistOf(scale.x), y: nyquistOf(scale.y) };
  const weights = cropWeights(spec, plan.crop);
  const crop = weights
    ? {
        planned: cropRatio(regionFoldings(spec, nyquist, withExtraBlur(sampled.x, n, 0), withExtraBlur(sampled.y, n, 0)), weights),
        unfiltered: cropRatio(regionFoldings(spec, nyquist), weights),
      }
    : { planned: 1, unfiltered: 1 };
  return { spec, scale, nyquist, sampled, crop };
}

function unfilteredFraction(setup: FoldSetup): number {
  const n = setup.spec.tileSize;
  if (n === 0) return 0;
  const f = foldedEnergy(setup.spec.power, 0, axisTable(n, 1, setup.nyquist.x), axisTable(n, 1, setup.nyquist.y));
  f.total += coarseEnergy(setup.spec.coarse, n);
  return Math.min(1, foldedFraction(f) * setup.crop.unfiltered);
}

/** The plan's response per axis as the visibility model reads it (sampled once). */
export interface PlanGains {
  hx: Gain;
  hy: Gain;
  /** The spectrum tile size they were sampled for. */
  tileSize: number;
}

/**
 * The plan's sampled gains for a spectrum of tiles of `tileSize` (layoutTiles of the source's
 * size): they depend on the plan alone, not on the spectrum's values, so a caller may make
 * them while the source is still being analysed. Pure.
 */
export function planGains(plan: Plan, response: PlanResponse, tileSize: number): PlanGains {
  const hx = sampledGain((f) => response('x', f), nyquistOf(plan.x.scale), tileSize);
  const hy = sampledGain((f) => response('y', f), nyquistOf(plan.y.scale), tileSize);
  return { hx, hy, tileSize };
}

/** The planned rendition as a viewer at `density` sees it (`gains`: planGains made before, for this spectrum's tile size). */
function seenBy(spec: SourceSpectrum, plan: Plan, response: PlanResponse, density: number, crop = 1, gains?: PlanGains) {
  const scale = { x: plan.x.scale, y: plan.y.scale };
  const scene = sceneOf(spec, scale, viewingAt(density), crop);
  const { hx, hy } = gains && gains.tileSize === spec.tileSize ? gains : planGains(plan, response, spec.tileSize);
  return { scene, hx, hy };
}

const isAuto = (plan: Plan) =>
  (plan.x.sigmaFrom === 'kernel' || plan.x.sigmaFrom === 'content') &&
  (plan.y.sigmaFrom === 'kernel' || plan.y.sigmaFrom === 'content');

const LEVEL_WORDS: Record<RiskLevel, string> = {
  low: 'low: nothing a viewer will see',
  moderate: 'moderate: faint false patterns, visible on close inspection',
  high: 'high: plainly visible false patterns',
};

/** Why prefilter=auto left a visible pattern in place (empty when nothing visible remains). */
function whyLeft(plan: Plan, margin: number): string | undefined {
  if (margin < VISIBLE_MARGIN) return undefined;
  if (!(plan.x.scale > 1 || plan.y.scale > 1)) return 'the rendition does not shrink the source: the pattern is in the source itself';
  if (!isAuto(plan)) return 'prefilter=auto is off for this request (prefilter=none or a sigma), so nothing removes it';
  const c = Math.min(plan.x.cutoff ?? 1, plan.y.cutoff ?? 1);
  if (c <= CUT_MIN + 1e-9) return `prefilter=auto stopped at its floor, ${CUT_MIN}x the kernel's cut-off, to keep the detail this width is for`;
  return 'prefilter=auto judges at density 1 and from the sampled response; this request differs from that estimate';
}

/** Alias risk of rendering `plan` from the source whose spectrum is `spec`, seen at `density`. Pure. */
export function assessRisk(spec: SourceSpectrum, plan: Plan, response: PlanResponse, density = 1): RiskReport {
  const setup = setupOf(spec, plan, response);
  const planned = foldedWithBlur(setup, 0);
  const n = spec.tileSize;
  let total = coarseEnergy(spec.coarse, n);
  for (let i = 0; i < spec.power.length; i++) total += spec.power[i];
  const peaks = findPeaks({
    power: spec.power, size: n, total, scale: setup.scale, nyquist: setup.nyquist,
    hx: (f) => Math.abs(response('x', f)), hy: (f) => Math.abs(response('y', f)),
  });
  const extra = extraSigmaFor(setup, blurForTarget(setup, TARGET));
  const { scene, hx, hy } = seenBy(spec, plan, response, density, setup.crop.unfiltered);
  const seen = see(scene, hx, hy);
  const visible = seen.patterns.filter((p) => p.kind !== 'clean' && p.margin >= VISIBLE_MARGIN);
  const auto = isAuto(plan);
  const capped = auto && Math.min(plan.x.cutoff ?? 1, plan.y.cutoff ?? 1) <= CUT_MIN + 1e-9;
  const parts = [LEVEL_WORDS[seen.level]];
  const top = seen.patterns[0];
  if (top && top.kind !== 'clean' && top.margin > 0.1) parts.push(`strongest: ${top.description}, ${top.margin.toFixed(2)}x threshold`);
  const left = whyLeft(plan, seen.margin);
  if (left) parts.push(left);
  const lowered = (plan.x.cutoff ?? 1) < 1 || (plan.y.cutoff ?? 1) < 1;
  if (lowered) parts.push(`prefilter=auto lowered the cut-off to ${(plan.x.cutoff ?? 1).toFixed(2)}x, ${(plan.y.cutoff ?? 1).toFixed(2)}x${evenedWords(spec, plan, seen.patterns)}`);
  return {
    nyquist: setup.nyquist,
    scale: setup.scale,
    folded: { unfiltered: unfilteredFraction(setup), planned },
    score: visibilityScore(seen.margin),
    level: seen.level,
    patterns: seen.patterns,
    margin: seen.margin,
    viewing: scene.viewing,
    cutoff: { x: plan.x.cutoff ?? 1, y: plan.y.cutoff ?? 1 },
    advice: plan.x.scale > 1 || plan.y.scale > 1 ? adviceFor(plan, visible, auto, capped) : [],
    peaks,
    grid: regionRisk(setup, seen.patterns),
    recommendedSigma: { x: Math.hypot(plan.x.sigma, extra.x), y: Math.hypot(plan.y.sigma, extra.y) },
    reason: parts.join('; '),
  };
}

/**
 * prefilter=auto's filter for a plan made with the kernel's own cut-off: per-axis cut-off
 * factors where a false pattern would show at density 1 (the coarsest a rendition is seen at),
 * undefined when nothing would show. No extra Gaussian.
 */
export function adaptiveFilter(spec: SourceSpectrum, plan: Plan, response: PlanResponse, gains?: PlanGains): AdaptiveFilter | undefined {
  if (spec.tileSize === 0 || !(plan.x.scale > 1 || plan.y.scale > 1)) return undefined;
  const weights = cropWeights(spec, plan.crop);
  const crop = weights ? cropRatio(regionFoldings(spec, { x: nyquistOf(plan.x.scale), y: nyquistOf(plan.y.scale) }), weights) : 1;
  const { scene, hx, hy } = seenBy(spec, plan, response, 1, crop, gains);
  const { cutoff } = autoCutoff(scene, hx, hy);
  if (cutoff.x >= 1 && cutoff.y >= 1) return undefined;
  return { x: 0, y: 0, cutoff };
}

/** The plain-words level, for callers that print one. */
export const levelWords = (level: RiskLevel) => LEVEL_WORDS[level];
export { PLAIN_MARGIN };
