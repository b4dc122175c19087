/**
 * Per-region risk: the folding model applied to each region's coarse spectrum (the Welch
 * tiles of that region only), so the map shows where the folded energy sits. A cell scores
 * the region's folded energy against the whole source's mean energy, not against its own: a
 * flat region folding a large share of almost nothing is not a risk, and the cells then
 * average to the whole-source fraction.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { withExtraBlur } from './filter.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction, type AxisResponse, type Folding } from './model.js';
import type { FoldSetup } from './recommend.js';
import { scoreOf } from './score.js';

export interface RiskGrid {
  columns: number;
  rows: number;
  /** Score 0..1 per region, row-major, for the planned filter (folded energy / source mean energy). */
  cells: number[];
  /** Folded fraction of each region's own energy, row-major, for the planned filter. */
  folded: number[];
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

/** Region scores of one spectrum under the planned filter. */
export function regionRisk(setup: FoldSetup): RiskGrid {
  const spec: SourceSpectrum = setup.spec;
  const { columns, rows } = spec.grid;
  const n = spec.tileSize;
  const parts = regionFoldings(spec, setup.nyquist, withExtraBlur(setup.sampled.x, n, 0), withExtraBlur(setup.sampled.y, n, 0));
  if (parts.length === 0) {
    return { columns, rows, cells: new Array(columns * rows).fill(0), folded: new Array(columns * rows).fill(0) };
  }
  let mean = coarseEnergy(spec.coarse, n);
  for (const f of parts) mean += f.total / parts.length;
  return {
    columns,
    rows,
    cells: parts.map((f) => (mean > 0 ? scoreOf(Math.max(0, f.folded) / mean) : 0)),
    folded: parts.map(foldedFraction),
  };
}
