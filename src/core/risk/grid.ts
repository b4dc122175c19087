/**
 * Per-region risk: the folding model applied to each region's coarse spectrum (the Welch
 * tiles of that region only), so the map shows where the folded energy sits. A cell scores
 * the region's folded energy against the whole source's mean energy, not against its own: a
 * flat region folding a large share of almost nothing is not a risk, and the cells then
 * average to the whole-source fraction.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { withExtraBlur } from './filter.js';
import { axisTable, coarseEnergy, foldedEnergy, foldedFraction, type Folding } from './model.js';
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

/** Region scores of one spectrum under the planned filter. */
export function regionRisk(setup: FoldSetup): RiskGrid {
  const spec: SourceSpectrum = setup.spec;
  const { columns, rows, bins, binSize, power } = spec.grid;
  const cells: number[] = [];
  const folded: number[] = [];
  if (spec.tileSize === 0) {
    return { columns, rows, cells: new Array(columns * rows).fill(0), folded: new Array(columns * rows).fill(0) };
  }
  const n = spec.tileSize;
  const tx = axisTable(bins, binSize, setup.nyquist.x, withExtraBlur(setup.sampled.x, n, 0));
  const ty = axisTable(bins, binSize, setup.nyquist.y, withExtraBlur(setup.sampled.y, n, 0));
  const regions = columns * rows;
  const parts: Folding[] = [];
  let mean = coarseEnergy(spec.coarse, n);
  for (let r = 0; r < regions; r++) {
    const f = foldedEnergy(power, r * bins * bins, tx, ty);
    parts.push(f);
    mean += f.total / regions;
  }
  for (const f of parts) {
    folded.push(foldedFraction(f));
    cells.push(mean > 0 ? scoreOf(Math.max(0, f.folded) / mean) : 0);
  }
  return { columns, rows, cells, folded };
}
