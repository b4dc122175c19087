/**
 * How much extra Gaussian blur would bring the folded fraction down to the low level. The
 * extra sigma is t * s on each shrinking axis (the Nyquist frequency scales as 1/s, so one t
 * means the same attenuation at the same fraction of the new Nyquist on both axes).
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { withExtraBlur } from './filter.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction } from './model.js';

export interface FoldSetup {
  spec: SourceSpectrum;
  scale: { x: number; y: number };
  nyquist: { x: number; y: number };
  /** Planned responses sampled on the spectrum grid (filter.ts). */
  sampled: { x: Float64Array; y: Float64Array };
  /** How much more the plan's crop folds than the whole source (crop.ts), planned and unfiltered. */
  crop: { planned: number; unfiltered: number };
}

/** Extra sigma per axis for a blur parameter t (0 on axes that do not shrink). */
export function extraSigmaFor(setup: FoldSetup, t: number): { x: number; y: number } {
  return { x: setup.scale.x > 1 ? t * setup.scale.x : 0, y: setup.scale.y > 1 ? t * setup.scale.y : 0 };
}

/** Folded fraction of the whole-source spectrum under the plan cascaded with blur parameter t. */
export function foldedWithBlur(setup: FoldSetup, t: number): number {
  const { spec, nyquist, sampled } = setup;
  const n = spec.tileSize;
  if (n === 0) return 0;
  const extra = extraSigmaFor(setup, t);
  const tx = axisTable(n, 1, nyquist.x, withExtraBlur(sampled.x, n, extra.x));
  const ty = axisTable(n, 1, nyquist.y, withExtraBlur(sampled.y, n, extra.y));
  const f = foldedEnergy(spec.power, 0, tx, ty);
  f.total += coarseEnergy(spec.coarse, n);
  return Math.min(1, foldedFraction(f) * setup.crop.planned);
}

/** Largest blur parameter searched: sigma = 2 s puts the Gaussian at exp(-19.7) at the new Nyquist. */
const MAX_BLUR = 2;

/**
 * Smallest t in [0, MAX_BLUR] with foldedWithBlur(t) <= target (bisection to 1e-3 of MAX_BLUR;
 * the fraction falls monotonically with t). Returns MAX_BLUR when even that is not enough.
 */
export function blurForTarget(setup: FoldSetup, target: number): number {
  if (foldedWithBlur(setup, 0) <= target) return 0;
  let lo = 0;
  let hi = MAX_BLUR;
  if (foldedWithBlur(setup, hi) > target) return hi;
  while (hi - lo > 1e-3 * MAX_BLUR) {
    const mid = (lo + hi) / 2;
    if (foldedWithBlur(setup, mid) <= target) hi = mid;
    else lo = mid;
  }
  return hi;
}
