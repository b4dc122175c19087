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

/** Cells (i, j) of an n x n grid within 1.5 cells of a line or its conjugate: each line's own lobe. */
function lineMask(lines: ReadonlyArray<{ fx: number; fy: number }>, n: number): Uint8Array | undefined {
  if (lines.length === 0) return undefined;
  const mask = new Uint8Array(n * n);
  for (let j = 0; j < n; j++) {
    const y = (j - n / 2) / n;
    for (let i = 0; i < n; i++) {
      const x = (i - n / 2) / n;
      if (lines.some((l) => near(l.fx, l.fy, x, y, n) || near(-l.fx, -l.fy, x, y, n))) mask[j * n + i] = 1;
    }
  }
  return mask;
}

/**
 * The cells of `spec` beyond the new Nyquist, ready for foldMargin. The squared sensitivity
 * depends on |folded fx| and |folded fy| only, so it is computed once per mirror-image quartet.
 */
export function foldCells(
  spec: SourceSpectrum,
  scale: { x: number; y: number },
  viewing: Viewing,
  mean: number,
  lines: ReadonlyArray<{ fx: number; fy: number }> = [],
  own = false,
): FoldCells {
  const n = spec.tileSize;
  const power = spec.power;
  const fx = new Float64Array(n * n);
  const fy = new Float64Array(n * n);
  const weight = new Float64Array(n * n);
  const sens = new Float64Array(n * n);
  let peak = 0;
  for (let i = 0; i < power.length; i++) if (power[i] > peak) peak = power[i];
  const nx = 0.5 / scale.x;
  const ny = 0.5 / scale.y;
  const h = (n >> 1) + 1;
  const memo = new Float64Array(h * h).fill(-1);
  const mask = lineMask(lines, n);
  const unit = 2 / (n * n * mean * mean);
  let count = 0;
  for (let j = 0; j < n; j++) {
    const y = (j - n / 2) / n;
    const ay = own ? scale.y * y : scale.y * y - Math.round(scale.y * y);
    for (let i = 0; i < n; i++) {
      const x = (i - n / 2) / n;
      const inside = Math.abs(x) <= nx && Math.abs(y) <= ny;
      // `own`: the rendition's own detail between half and the whole new Nyquist (the masker).
      if (own ? !inside || Math.max(Math.abs(x) / nx, Math.abs(y) / ny) < 0.5 : inside) continue;
      // The lines' own lobes (3 x 3 cells, both conjugates) are counted as line patterns.
      if (mask && mask[j * n + i]) continue;
      const p = power[j * n + i];
      if (!(p > NEGLIGIBLE * peak)) continue;
      const ax = own ? scale.x * x : scale.x * x - Math.round(scale.x * x);
      const q = Math.abs(j - n / 2) * h + Math.abs(i - n / 2);
      if (memo[q] < 0) memo[q] = contrastThreshold(cyclesPerDegree(Math.hypot(ax, ay), viewing)) ** -2;
      fx[count] = x;
      fy[count] = y;
      weight[count] = p * unit;
      sens[count] = memo[q];
      count++;
    }
  }
  return {
    fx: fx.slice(0, count),
    fy: fy.slice(0, count),
    weight: weight.slice(0, count),
    sensitivity2: sens.slice(0, count),
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
