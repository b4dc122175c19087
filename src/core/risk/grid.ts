/**
 * Per-region risk: the folding model applied to each region's coarse spectrum (the Welch
 * tiles of that region only), so the map shows where the folded energy sits, and the
 * visibility model's false patterns placed by the same spectra (`margins`). A cell scores
 * the region's folded energy against the whole source's mean energy, not against its own: a
 * flat region folding a large share of almost nothing is not a risk, and the cells then
 * average to the whole-source fraction.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { withExtraBlur } from './filter.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction, type AxisResponse, type Folding } from './model.js';
import type { FoldSetup } from './recommend.js';
import { scoreOf } from './score.js';
import type { VisiblePattern } from './visibility.js';

export interface RiskGrid {
  columns: number;
  rows: number;
  /** Score 0..1 per region, row-major, for the planned filter (folded energy / source mean energy). */
  cells: number[];
  /** Folded fraction of each region's own energy, row-major, for the planned filter. */
  folded: number[];
  /**
   * Threshold units per region, row-major (1.0 = just visible): the largest margin of any false
   * pattern there. A pattern's contrast goes as the square root of its energy, so a region
   * holding k times the regions' mean energy of it shows it at sqrt(k) times the picture's
   * margin: a line (fold or beat) by the region's energy in the coarse cells around its source
   * frequency, the broadband fold by the region's folded energy under the planned filter.
   */
  margins: number[];
}

/** Sum of a region's coarse cells within 1.5 full cells of (fx, fy) source cycles/px. */
function energyAt(spec: SourceSpectrum, region: number, fx: number, fy: number): number {
  const { bins, binSize, power } = spec.grid;
  const n = bins * binSize;
  const range = (f: number) => {
    const c = f * n + n / 2;
    return [Math.max(0, Math.floor((c - 1.5) / binSize)), Math.min(bins - 1, Math.floor((c + 1.5) / binSize))];
  };
  const [x0, x1] = range(fx);
  const [y0, y1] = range(fy);
  let e = 0;
  for (let y = y0; y <= y1; y++) for (let x = x0; x <= x1; x++) e += power[region * bins * bins + y * bins + x];
  return e;
}

/** Each region's margin (see RiskGrid.margins) from the picture's patterns and the regions' foldings. */
export function regionMargins(spec: SourceSpectrum, parts: Folding[], patterns: readonly VisiblePattern[]): number[] {
  const count = parts.length;
  const out = new Array<number>(count).fill(0);
  const spread = (share: (r: number) => number, margin: number) => {
    let mean = 0;
    for (let r = 0; r < count; r++) mean += share(r) / count;
    for (let r = 0; r < count; r++) out[r] = Math.max(out[r], mean > 0 ? margin * Math.sqrt(Math.max(0, share(r)) / mean) : margin);
  };
  for (const p of patterns) {
    if (p.kind === 'clean' || !(p.margin > 0)) continue;
    if (p.source === 'broadband') spread((r) => parts[r].folded, p.margin);
    else spread((r) => energyAt(spec, r, p.frequency.fx, p.frequency.fy), p.margin);
  }
  return out;
}

/**
 * Total and folded energy of every region's coarse spectrum (row-major) under the axis
 * responses (undefined: no filter). Empty when the source was too small to analyse.
 */
export function regionFoldings(
  spec: SourceSpectrum,
  nyquist: { x: number; y: number },
  hx?: AxisResponse,
  hy?: AxisResponse,
): Folding[] {
  const { columns, rows, bins, binSize, power } = spec.grid;
  if (spec.tileSize === 0) return [];
  const tx = axisTable(bins, binSize, nyquist.x, hx);
  const ty = axisTable(bins, binSize, nyquist.y, hy);
  const parts: Folding[] = [];
  for (let r = 0; r < columns * rows; r++) parts.push(foldedEnergy(power, r * bins * bins, tx, ty));
  return parts;
}

/** Region scores and margins of one spectrum under the planned filter. */
export function regionRisk(setup: FoldSetup, patterns: readonly VisiblePattern[] = []): RiskGrid {
  const spec: SourceSpectrum = setup.spec;
  const { columns, rows } = spec.grid;
  const n = spec.tileSize;
  const parts = regionFoldings(spec, setup.nyquist, withExtraBlur(setup.sampled.x, n, 0), withExtraBlur(setup.sampled.y, n, 0));
  if (parts.length === 0) {
    const zero = () => new Array<number>(columns * rows).fill(0);
    return { columns, rows, cells: zero(), folded: zero(), margins: zero() };
  }
  let mean = coarseEnergy(spec.coarse, n);
  for (const f of parts) mean += f.total / parts.length;
  return {
    columns,
    rows,
    cells: parts.map((f) => (mean > 0 ? scoreOf(Math.max(0, f.folded) / mean) : 0)),
    folded: parts.map(foldedFraction),
    margins: regionMargins(spec, parts, patterns),
  };
}
