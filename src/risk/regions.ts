/**
 * Plain-word names for where on an image a coarse risk grid is hot.
 *
 * The grid is split into thirds each way; each hot cell votes for the third it falls in,
 * weighted by its risk. The result names at most two zones, or the whole image when the
 * risk is spread over most of it.
 */

export interface RiskGrid {
  columns: number;
  rows: number;
  /** Row-major, one value per cell, 0..1. */
  cells: ArrayLike<number>;
}

const ZONE_NAMES = [
  ['upper-left', 'top', 'upper-right'],
  ['left', 'central', 'right'],
  ['lower-left', 'bottom', 'lower-right'],
] as const;

function third(index: number, count: number): number {
  // Cell centre in 0..1, then which third it falls in.
  return Math.min(2, Math.floor((((index + 0.5) / count) * 3)));
}

/**
 * Names the regions whose cells reach `threshold` (default: half the hottest cell, and at
 * least 0.05 so a flat, harmless grid names nothing). Returns `undefined` when no cell is hot.
 */
export function describeRegion(grid: RiskGrid, threshold?: number): string | undefined {
  const { columns, rows, cells } = grid;
  if (!(columns >= 1 && rows >= 1) || cells.length < columns * rows) return undefined;
  let max = 0;
  for (let i = 0; i < columns * rows; i++) max = Math.max(max, cells[i]);
  const cut = threshold ?? Math.max(0.05, max / 2);
  if (!(max >= cut) || max <= 0) return undefined;
  const weight = new Float64Array(9);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns; c++) {
      const v = cells[r * columns + c];
      if (v >= cut) weight[third(r, rows) * 3 + third(c, columns)] += v;
    }
  }
  const zones = [...weight.keys()].filter((z) => weight[z] > 0).sort((a, b) => weight[b] - weight[a]);
  if (zones.length >= 6) return 'most of the image';
  const names = zones.slice(0, 2).map((z) => ZONE_NAMES[Math.floor(z / 3)][z % 3]);
  return names.length === 1 ? `the ${names[0]} region` : `the ${names[0]} and ${names[1]} regions`;
}
