/**
 * A rendition that shows only part of the source (a cover crop) folds what that part holds.
 * The whole-source spectrum keeps its full frequency resolution; the regions' coarse spectra
 * say how much more or less the cropped part folds than the whole, and that ratio scales it.
 */
import type { CropRect } from '../types.js';
import type { SourceSpectrum } from '../spectrum/index.js';
import type { Folding } from './model.js';

/** A crop covering at least this share of the source counts as the whole source. */
const WHOLE = 0.99;

/**
 * Share of each region (row-major) that lies inside `crop`; undefined when the crop covers
 * (nearly) the whole source.
 */
export function cropWeights(spec: SourceSpectrum, crop: CropRect): Float64Array | undefined {
  const { width, height } = spec;
  const { columns, rows } = spec.grid;
  if (crop.width * crop.height >= WHOLE * width * height) return undefined;
  const overlap = (a0: number, a1: number, b0: number, b1: number) => Math.max(0, Math.min(a1, b1) - Math.max(a0, b0));
  const w = new Float64Array(columns * rows);
  for (let r = 0; r < rows; r++) {
    const y0 = (r * height) / rows;
    const y1 = ((r + 1) * height) / rows;
    for (let c = 0; c < columns; c++) {
      const x0 = (c * width) / columns;
      const x1 = ((c + 1) * width) / columns;
      const area = (x1 - x0) * (y1 - y0);
      w[r * columns + c] = (overlap(x0, x1, crop.x, crop.x + crop.width) * overlap(y0, y1, crop.y, crop.y + crop.height)) / area;
    }
  }
  return w;
}

/**
 * Folded share of the crop-weighted regions over that of all regions (1 without weights, or
 * when the whole source folds nothing at this resolution).
 */
export function cropRatio(parts: Folding[], weights: Float64Array | undefined): number {
  if (!weights || parts.length !== weights.length) return 1;
  let fw = 0;
  let tw = 0;
  let fa = 0;
  let ta = 0;
  for (let r = 0; r < parts.length; r++) {
    fw += weights[r] * Math.max(0, parts[r].folded);
    tw += weights[r] * parts[r].total;
    fa += Math.max(0, parts[r].folded);
    ta += parts[r].total;
  }
  if (!(fa > 0 && ta > 0)) return 1;
  return tw > 0 ? fw / tw / (fa / ta) : 0;
}
