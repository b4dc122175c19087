/**
 * The folding model. A rendition samples the filtered source on a lattice s source pixels
 * apart per axis, so its Nyquist frequency is 0.5 / s source cycles per pixel (Nyquist 1928;
 * Shannon 1949). Spectral energy outside the rectangle |fx| <= 0.5/sx, |fy| <= 0.5/sy folds
 * back into the rendition; the planned filter first weights it by |Hx(fx) Hy(fy)|^2
 * (a separable resampler has a separable response).
 */

/** Magnitude response of one axis at |f| cycles per source pixel. */
export type AxisResponse = (f: number) => number;

/** Per-bin sums of |H|^2 for one axis of a (possibly binned) centred spectrum. */
export interface AxisTable {
  /** Sum of |H(f)|^2 over the bin's member frequencies. */
  all: Float64Array;
  /** The same sum over the members that lie within the Nyquist band (|f| <= nyquist). */
  inside: Float64Array;
  /** Member frequencies per bin. */
  members: number;
}

/**
 * Axis table for a centred spectrum of `bins` bins of `members` full cells each, the full
 * spectrum being bins * members cells wide. `response` undefined means no filter (|H| = 1).
 */
export function axisTable(bins: number, members: number, nyquist: number, response?: AxisResponse): AxisTable {
  const n = bins * members;
  const all = new Float64Array(bins);
  const inside = new Float64Array(bins);
  for (let b = 0; b < bins; b++) {
    for (let j = 0; j < members; j++) {
      const f = Math.abs(b * members + j - n / 2) / n;
      const h = response ? response(f) : 1;
      all[b] += h * h;
      if (f <= nyquist) inside[b] += h * h;
    }
  }
  return { all, inside, members };
}

/** Total energy and folded energy of one centred spectrum (bins x bins, at `offset`). */
export interface Folding {
  total: number;
  folded: number;
}

/** Energy of `power` and the part that folds back, weighted by the axis tables. No allocation. */
export function foldedEnergy(power: Float32Array, offset: number, tx: AxisTable, ty: AxisTable): Folding {
  const bins = tx.all.length;
  const cells = tx.members * ty.members;
  let total = 0;
  let folded = 0;
  for (let by = 0; by < bins; by++) {
    const ay = ty.all[by];
    const iy = ty.inside[by];
    const row = offset + by * bins;
    for (let bx = 0; bx < bins; bx++) {
      const p = power[row + bx];
      total += p;
      folded += (p * (tx.all[bx] * ay - tx.inside[bx] * iy)) / cells;
    }
  }
  return { total, folded };
}

/**
 * The whole-source energy of a Welch spectrum in the units of its cells: the within-tile part
 * (sum of cells) plus the between-tile part, `coarse` variance times tileSize^2 (Parseval:
 * sum over k of P = T^2 times the window-weighted variance of the tile).
 */
export function coarseEnergy(coarse: number, tileSize: number): number {
  return coarse * tileSize * tileSize;
}

/** Folded share of the energy; 0 for a spectrum with no energy (a flat field). */
export function foldedFraction(f: Folding): number {
  return f.total > 0 ? Math.max(0, f.folded) / f.total : 0;
}

/** New Nyquist frequency in source cycles per pixel for a scale s (source / target). */
export function nyquistOf(scale: number): number {
  return 0.5 / scale;
}

/** Gaussian magnitude response H(f) = exp(-2 pi^2 sigma^2 f^2) (CHECKS.md). */
export function gaussianResponse(sigma: number, f: number): number {
  return Math.exp(-2 * Math.PI * Math.PI * sigma * sigma * f * f);
}

/** Where a frequency f (source cycles/px) lands after sampling every s pixels: |s f - round(s f)|. */
export function aliasFrequency(scale: number, f: number): number {
  const v = scale * f;
  return Math.abs(v - Math.round(v));
}
