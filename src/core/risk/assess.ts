/**
 * The alias-risk report of one rendition plan against one source spectrum, and the extra blur
 * that prefilter=auto adds when the plan would still fold visibly.
 */
import type { Plan } from '../types.js';
import type { SourceSpectrum } from '../spectrum/index.js';
import { cropRatio, cropWeights } from './crop.js';
import { sampleResponse, withExtraBlur, type PlanResponse } from './filter.js';
import { regionFoldings, regionRisk, type RiskGrid } from './grid.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction, nyquistOf } from './model.js';
import { findPeaks, type RiskPeak } from './peaks.js';
import { blurForTarget, extraSigmaFor, foldedWithBlur, type FoldSetup } from './recommend.js';
import { fractionDb, levelOf, LOW_FRACTION, scoreOf, type RiskLevel } from './score.js';

/** Alias risk of one rendition. Frequencies in source cycles per pixel unless said otherwise. */
export interface RiskReport {
  /** New Nyquist frequency per axis, 0.5 / s. */
  nyquist: { x: number; y: number };
  /** Source extent / target extent per axis. */
  scale: { x: number; y: number };
  /**
   * Share of the non-DC energy that folds back, with no prefilter and with the planned filter,
   * for the part of the source the plan's crop shows (crop.ts).
   */
  folded: { unfiltered: number; planned: number };
  score: number;
  level: RiskLevel;
  /** Strongest peaks beyond the new Nyquist in the whole source's spectrum. */
  peaks: RiskPeak[];
  /** Per-region risk over the whole source (the crop is drawn on the map). */
  grid: RiskGrid;
  /** Total Gaussian prefilter sigma per axis (source px) that brings the level to low. */
  recommendedSigma: { x: number; y: number };
  reason: string;
}

/** Aim a little under the low threshold so a recommendation does not sit on the boundary. */
const TARGET = 0.9 * LOW_FRACTION;
/**
 * prefilter=auto adds at most 0.35 s of sigma per axis: the cascade then still keeps
 * exp(-2 pi^2 (0.35 s)^2 (0.25 / s)^2) = 86 % at half the new Nyquist, so detail the rendition
 * can carry is softened, not lost.
 */
export const ADAPTIVE_MAX = 0.35;

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

const pct = (v: number) => `${(100 * v).toPrecision(2)} %`;

/** Alias risk of rendering `plan` from the source whose spectrum is `spec`. Pure. */
export function assessRisk(spec: SourceSpectrum, plan: Plan, response: PlanResponse): RiskReport {
  const setup = setupOf(spec, plan, response);
  const unfiltered = unfilteredFraction(setup);
  const planned = foldedWithBlur(setup, 0);
  const level = levelOf(planned);
  const n = spec.tileSize;
  let total = coarseEnergy(spec.coarse, n);
  for (let i = 0; i < spec.power.length; i++) total += spec.power[i];
  const peaks = findPeaks({
    power: spec.power,
    size: n,
    total,
    scale: setup.scale,
    nyquist: setup.nyquist,
    hx: (f) => Math.abs(response('x', f)),
    hy: (f) => Math.abs(response('y', f)),
  });
  const extra = extraSigmaFor(setup, blurForTarget(setup, TARGET));
  const recommendedSigma = {
    x: Math.hypot(plan.x.sigma, extra.x),
    y: Math.hypot(plan.y.sigma, extra.y),
  };
  const db = planned > 0 ? `${fractionDb(planned).toFixed(1)} dB` : 'none';
  const parts = [`this plan's filter lets ${pct(planned)} of the detail energy fold back (${db}): ${level}`];
  const moire = peaks.find((p) => p.kind === 'periodic' && p.power * p.passed >= TARGET);
  if (moire) {
    parts.push(
      `a periodic pattern at (${moire.fx.toFixed(3)}, ${moire.fy.toFixed(3)}) cycles/px will show as ` +
        `moiré at (${moire.aliasTo.fx.toFixed(3)}, ${moire.aliasTo.fy.toFixed(3)}) cycles per output px`,
    );
  }
  if (level !== 'low') {
    parts.push(`a prefilter sigma of ${recommendedSigma.x.toFixed(2)} x ${recommendedSigma.y.toFixed(2)} px brings it to low`);
  }
  return {
    nyquist: setup.nyquist,
    scale: setup.scale,
    folded: { unfiltered, planned },
    score: scoreOf(planned),
    level,
    peaks,
    grid: regionRisk(setup),
    recommendedSigma,
    reason: parts.join('; '),
  };
}

/**
 * Extra sigma per axis (source px) for prefilter=auto: only when the plan would leave a high
 * level, just enough to reach low, at most ADAPTIVE_MAX * s. Undefined when none is needed.
 */
export function adaptiveSigma(
  spec: SourceSpectrum,
  plan: Plan,
  response: PlanResponse,
): { x: number; y: number } | undefined {
  const setup = setupOf(spec, plan, response);
  if (levelOf(foldedWithBlur(setup, 0)) !== 'high') return undefined;
  const t = Math.min(ADAPTIVE_MAX, blurForTarget(setup, TARGET));
  return t > 0 ? extraSigmaFor(setup, t) : undefined;
}
