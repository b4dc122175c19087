/**
 * Per-region risk: the folding model applied to each region's coarse spectrum (the Welch
 * tiles of that region only), so the map shows where the folded energy sits.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { withExtraBlur } from './filter.js';
import { axisTable, foldedEnergy, foldedFraction } from './model.js';
import type { FoldSetup } from './recommend.js';
import { scoreOf } from './score.js';

export interface RiskGrid {
  columns: number;
  rows: number;
  /** Score 0..1 per region, row-major, for the planned filter. */
  cells: number[];
  /** Folded fraction per region, row-major, for the planned filter. */
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
  for (let r = 0; r < columns * rows; r++) {
    const f = foldedFraction(foldedEnergy(power, r * bins * bins, tx, ty));
    folded.push(f);
    cells.push(scoreOf(f));
  }
  return { columns, rows, cells, folded };
}
