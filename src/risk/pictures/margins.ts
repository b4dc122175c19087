/**
 * Visibility per region of the risk grid, in threshold units, for the map. The model rates the
 * whole picture (its strongest false pattern's margin); the grid says where the folded energy
 * sits (a score per region on the dB scale of src/core/risk/score.ts). A fold's contrast goes
 * as the square root of its energy, so a region folding k times the regions' mean energy shows
 * the pattern at sqrt(k) times the picture's margin. A beat is not folded energy: it is spread
 * as evenly as the picture's periodic content, so every region gets the picture's margin.
 */
import { CEIL_DB, FLOOR_DB } from '../../core/risk/index.js';

export interface MarginSource {
  grid: { columns: number; rows: number; cells: ArrayLike<number> };
  /** The strongest false pattern's margin; 0 when nothing false is seen. */
  margin: number;
  patterns: ReadonlyArray<{ kind: string; margin: number }>;
}

/** Folded energy over the source's mean energy of a region score (a score of 0 counts as FLOOR_DB). */
const energyOf = (score: number) => 10 ** ((FLOOR_DB + Math.min(1, Math.max(0, score)) * (CEIL_DB - FLOOR_DB)) / 10);

/** Threshold units per region, row-major. */
export function regionMargins(report: MarginSource): number[] {
  const { cells } = report.grid;
  const n = cells.length;
  const worst = report.patterns.filter((p) => p.kind !== 'clean').sort((a, b) => b.margin - a.margin)[0];
  if (!worst || !(report.margin > 0)) return new Array<number>(n).fill(0);
  if (worst.kind !== 'fold') return new Array<number>(n).fill(report.margin);
  const energy = Array.from(cells, energyOf);
  const mean = energy.reduce((a, e) => a + e, 0) / Math.max(1, n);
  return energy.map((e) => report.margin * Math.sqrt(e / mean));
}
