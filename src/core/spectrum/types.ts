/** The serialisable result of the Welch analysis (welch.ts). */

/**
 * Welch power spectrum of one source, as plain numbers and typed arrays (cacheable,
 * serialisable). Spectra are in centred order: cell (i, j) of a side-n spectrum is the
 * frequency fx = (i - n/2) / n, fy = (j - n/2) / n cycles per source pixel, stored at j * n + i.
 * Units: white noise of variance v reads v in every full-resolution cell.
 */
export interface SourceSpectrum {
  width: number;
  height: number;
  /** Tile side (a power of two); 0 when the image is too small to analyse. */
  tileSize: number;
  /** Number of tiles averaged. */
  tiles: number;
  /** Averaged periodogram, tileSize x tileSize cells. */
  power: Float32Array;
  /**
   * Variance of the tiles' windowed means (linear luminance squared): the energy at
   * frequencies too low for one tile to resolve. By the law of total variance the source's
   * non-DC energy is the mean within-tile energy (sum of `power` / tileSize^2) plus this.
   */
  coarse: number;
  /** Mean linear luminance over the tiles (optional: spectra stored before it was kept lack it). */
  mean?: number;
  /** Frames of an animated source (absent: a still); the analysis read the first frame. */
  frames?: number;
  /** Per-region spectra for the risk grid, each `bins` x `bins` cells; a cell sums binSize^2 full cells. */
  grid: { columns: number; rows: number; bins: number; binSize: number; power: Float32Array };
}
