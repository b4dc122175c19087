/**
 * The broadband fold: every cell of the source spectrum beyond the new Nyquist rectangle,
 * passed by the filter, lands at its folded frequency; the viewer sees the sum. Each cell's
 * contrast is weighted by the sensitivity at its folded frequency and the cells add in
 * quadrature (CSF-weighted RMS contrast, Minkowski exponent 2: common practice for noise-like
 * patterns), scaled by sqrt(2) so that a single line gives its own amplitude contrast. The
 * lines found by visibility.ts are left out: each is its own pattern.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { contrastThreshold, cyclesPerDegree, type Viewing } from './csf.js';
import type { Gain } from './visibility.js';

export interface FoldCells {
  /** Source frequencies of the cells beyond the Nyquist rectangle. */
  fx: Float64Array;
  fy: Float64Array;
  /** 2 p / (T^2 mean^2): the cell's share of the squared amplitude contrast. */
  weight: Float64Array;
  /** Squared sensitivity (1 / threshold)^2 at the cell's folded frequency. */
  sensitivity2: Float64Array;
  scale: { x: number; y: number };
  viewing: Viewing;
}

const near = (ax: number, ay: number, x: number, y: number, n: number) =>
  Math.abs(ax - x) * n <= 1.5 && Math.abs(ay - y) * n <= 1.5;

/** Cells below this share of the strongest are left out (they cannot change the sum). */
const NEGLIGIBLE = 1e-9;

/** The cells of `spec` beyond the new Nyquist, ready for foldMargin. */
export function foldCells(
  spec: SourceSpectrum,
  scale: { x: number; y: number },
  viewing: Viewing,
  mean: number,
  lines: ReadonlyArray<{ fx: number; fy: number }> = [],
  own = false,
): FoldCells {
  const n = spec.tileSize;
  const fx: number[] = [];
  const fy: number[] = [];
  const weight: number[] = [];
  const sens: number[] = [];
  let peak = 0;
  for (let i = 0; i < spec.power.length; i++) peak = Math.max(peak, spec.power[i]);
  const nx = 0.5 / scale.x;
  const ny = 0.5 / scale.y;
  for (let j = 0; j < n; j++) {
    const y = (j - n / 2) / n;
    for (let i = 0; i < n; i++) {
      const x = (i - n / 2) / n;
      const inside = Math.abs(x) <= nx && Math.abs(y) <= ny;
      // `own`: the rendition's own detail between half and the whole new Nyquist (the masker).
      if (own ? !inside || Math.max(Math.abs(x) / nx, Math.abs(y) / ny) < 0.5 : inside) continue;
      // The lines' own lobes (3 x 3 cells, both conjugates) are counted as line patterns.
      if (lines.some((l) => near(l.fx, l.fy, x, y, n) || near(-l.fx, -l.fy, x, y, n))) continue;
      const p = spec.power[j * n + i];
      if (!(p > NEGLIGIBLE * peak)) continue;
      const ax = own ? scale.x * x : scale.x * x - Math.round(scale.x * x);
      const ay = own ? scale.y * y : scale.y * y - Math.round(scale.y * y);
      fx.push(x);
      fy.push(y);
      weight.push((2 * p) / (n * n * mean * mean));
      sens.push(contrastThreshold(cyclesPerDegree(Math.hypot(ax, ay), viewing)) ** -2);
    }
  }
  return {
    fx: Float64Array.from(fx),
    fy: Float64Array.from(fy),
    weight: Float64Array.from(weight),
    sensitivity2: Float64Array.from(sens),
    scale,
    viewing,
  };
}

/** Folded contrast, its margin, and the cell that contributes most, under the axis gains. */
export function foldMargin(cells: FoldCells, hx: Gain, hy: Gain): { contrast: number; margin: number; top: number } {
  let c2 = 0;
  let m2 = 0;
  let top = -1;
  let best = 0;
  for (let k = 0; k < cells.weight.length; k++) {
    const g = hx(Math.abs(cells.fx[k])) * hy(Math.abs(cells.fy[k]));
    const v = cells.weight[k] * g * g;
    c2 += v;
    const m = v * cells.sensitivity2[k];
    m2 += m;
    if (m > best) {
      best = m;
      top = k;
    }
  }
  return { contrast: Math.sqrt(c2), margin: Math.sqrt(m2), top };
}
