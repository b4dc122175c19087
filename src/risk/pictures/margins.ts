/**
 * Visibility per region of the risk grid, in threshold units, for the map: the model's own
 * per-region margins (src/core/risk/grid.ts, `margins`: each false pattern placed by the
 * region's own spectrum). Nothing is estimated here.
 */
export interface MarginSource {
  grid: { columns: number; rows: number; margins: ArrayLike<number> };
}

/** Threshold units per region, row-major. */
export function regionMargins(report: MarginSource): number[] {
  return Array.from(report.grid.margins, (m) => (m > 0 ? m : 0));
}
