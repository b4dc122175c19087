/**
 * Welch estimate of the power spectrum of a source's linear-light luminance (Welch, P. D.
 * (1967), "The use of fast Fourier transform for the estimation of power spectra", IEEE Trans.
 * Audio Electroacoustics 15(2)): periodic-Hann-windowed square tiles spread over the whole
 * image, each periodogram normalised by the window's energy U = sum w^2, then averaged.
 * Each tile's windowed mean is removed first, so no DC leaks into the low bins.
 */
import type { PixelRaster } from '../types.js';
import { fftPlan } from './fft.js';
import { fft2dBitReversed } from './fft2d.js';
import { windowedTileLuminance } from './luminance.js';
import { accumulatePacked } from './periodogram.js';
import { simdFft2d, type SimdFft2d } from './simd.js';
import { layoutTiles, type TileLayout } from './tiles.js';
import type { SourceSpectrum } from './types.js';
import { window2d } from './window.js';

export type { SourceSpectrum } from './types.js';

/** Full-resolution cells per region-spectrum bin along each axis (2^BIN_SHIFT). */
const BIN_SHIFT = 2;
const BIN = 1 << BIN_SHIFT;

interface Scratch {
  re: Float64Array;
  im: Float64Array;
}
const scratches = new Map<number, Scratch>();

function scratchFor(t: number): Scratch {
  let s = scratches.get(t);
  if (!s) {
    s = { re: new Float64Array(t * t), im: new Float64Array(t * t) };
    scratches.set(t, s);
  }
  return s;
}

/**
 * Windowed luminance of tile `k` into `dst` (`into` 0: re, 1: im), bit-reversed on both axes,
 * by the Wasm loop where it serves this raster; returns its windowed mean.
 */
function loadTile(dst: Float64Array, into: 0 | 1, simd: SimdFft2d | null, src: PixelRaster, layout: TileLayout, k: number, rev: Uint32Array, rowAt?: RowAt): number {
  const t = layout.tileSize;
  let x0 = layout.corners[2 * k];
  let y0 = layout.corners[2 * k + 1];
  if (rowAt) {
    src = tileOf(src, rowAt, x0, y0, t);
    x0 = 0;
    y0 = 0;
  }
  const sum = simd?.luminance(into, src, x0, y0) ?? windowedTileLuminance(dst, src, x0, y0, t, window2d(t), rev);
  return sum / ((t / 2) * (t / 2)); // sum of the 2-D periodic Hann window is (T/2)^2
}

/** Source row y: its samples start at data[at] (renderRaster's rowAt, a spool file's reader). */
export type RowAt = (y: number) => { data: Uint8Array | Uint16Array; at: number };

const tiles = new Map<string, PixelRaster['data']>();

/**
 * The t x t tile at (x0, y0) of a source read row by row, as a raster of its own (the same
 * samples, so the same sums); the tile's buffer is kept per size and sample type.
 */
function tileOf(src: PixelRaster, rowAt: RowAt, x0: number, y0: number, t: number): PixelRaster {
  const { channels } = src;
  const n = t * channels;
  const first = rowAt(y0);
  const wide = first.data instanceof Uint16Array;
  const key = `${wide ? 16 : 8}:${t * n}`;
  let data = tiles.get(key);
  if (!data) tiles.set(key, (data = wide ? new Uint16Array(t * n) : new Uint8Array(t * n)));
  for (let y = 0; y < t; y++) {
    const row = y === 0 ? first : rowAt(y0 + y);
    const p = row.at + x0 * channels;
    data.set(row.data.subarray(p, p + n), y * n);
  }
  const tile: PixelRaster = { data, width: t, height: t, channels };
  if (src.gamut) tile.gamut = src.gamut;
  return tile;
}

/**
 * Removes the windowed means from a packed transform: FFT((a - ma) w + i (b - mb) w) =
 * Z - (ma + i mb) FFT(w). The periodic Hann window's DFT is T/2 at k = 0, -T/4 at k = +-1 and
 * 0 elsewhere (w = 1/2 - e^{2 pi i n/T}/4 - e^{-2 pi i n/T}/4), so only 9 cells change. In place.
 */
function removeMeans(re: Float64Array, im: Float64Array, t: number, ma: number, mb: number): void {
  for (let a = 0; a < 3; a++) {
    const ka = a === 2 ? t - 1 : a;
    const wa = a === 0 ? t / 2 : -t / 4;
    for (let b = 0; b < 3; b++) {
      const w = wa * (b === 0 ? t / 2 : -t / 4);
      const i = ka * t + (b === 2 ? t - 1 : b);
      re[i] -= ma * w;
      im[i] -= mb * w;
    }
  }
}

/** Options of {@link analyzeSpectrum}. */
export interface SpectrumOptions {
  /**
   * The source's rows, for a source not held whole (a spool file read as it is written): each
   * tile's rows are read through it, a tile's rows in order and the tiles in row order, and
   * `src.data` is not read (it may be empty). The same result as the whole raster gives.
   */
  rowAt?: RowAt;
}

/**
 * Welch spectrum of a decoded source (8- or 16-bit sRGB, 1..4 channels). Pure; reads a bounded
 * number of tiles (see tiles.ts), so its cost hardly grows past a few megapixels. With
 * `rowAt`, each tile's rows are asked in order and the tiles go in row order, so a source
 * still arriving can serve them (the same result: the same tiles, in the same order).
 */
export function analyzeSpectrum(src: PixelRaster, opts: SpectrumOptions = {}): SourceSpectrum {
  const { width, height, channels, data } = src;
  if (!(Number.isInteger(width) && Number.isInteger(height) && width >= 1 && height >= 1)) {
    throw new RangeError(`bad raster size ${width}x${height}`);
  }
  if (!(Number.isInteger(channels) && channels >= 1 && channels <= 4)) throw new RangeError(`bad channel count ${channels}`);
  if (!opts.rowAt && data.length < width * height * channels) {
    throw new RangeError('raster data is shorter than width * height * channels');
  }
  const layout = layoutTiles(width, height);
  const t = layout.tileSize;
  const regions = layout.columns * layout.rows;
  const bins = t / BIN;
  const count = layout.region.length;
  const perRegion = new Int32Array(regions);
  const plan = fftPlan(Math.max(1, t));
  // The Wasm loops where the engine has them (same values, simd.ts), their arrays in its memory.
  const simd = simdFft2d(plan);
  const { re, im } = simd ?? scratchFor(t);
  const inWasm = simd?.sinks(regions * bins * bins) ?? null;
  const power = inWasm?.power ?? new Float64Array(t * t);
  const regionPower = inWasm?.regionPower ?? new Float64Array(regions * bins * bins);
  // U = sum of the squared 2-D window = (3T/8)^2 (periodic Hann, Welch 1967); the 1/4 undoes
  // the packing of two real tiles into one complex transform.
  const norm = 1 / (4 * ((3 * t) / 8) ** 2);
  const sinks = { power, regionPower, bins, shift: BIN_SHIFT };
  let meanSum = 0;
  let meanSquares = 0;
  for (let k = 0; k < count; k += 2) {
    const ra = layout.region[k];
    const rb = k + 1 < count ? layout.region[k + 1] : -1;
    const ma = loadTile(re, 0, simd, src, layout, k, plan.rev, opts.rowAt);
    const mb = rb >= 0 ? loadTile(im, 1, simd, src, layout, k + 1, plan.rev, opts.rowAt) : 0;
    if (rb < 0) im.fill(0);
    meanSum += ma + mb;
    meanSquares += ma * ma + mb * mb;
    if (simd) simd.run();
    else fft2dBitReversed(plan, re, im);
    removeMeans(re, im, t, ma, mb);
    perRegion[ra]++;
    if (rb >= 0) perRegion[rb]++;
    const baseB = rb >= 0 ? rb * bins * bins : -1;
    if (simd && inWasm) simd.accumulate(norm, bins, BIN_SHIFT, ra * bins * bins, baseB);
    else accumulatePacked(re, im, t, norm, sinks, ra * bins * bins, baseB);
  }
  const out = new Float32Array(t * t);
  for (let i = 0; i < out.length; i++) out[i] = power[i] / count;
  const grid = new Float32Array(regionPower.length);
  for (let r = 0; r < regions; r++) {
    const n = perRegion[r] || 1;
    for (let c = 0; c < bins * bins; c++) grid[r * bins * bins + c] = regionPower[r * bins * bins + c] / n;
  }
  return {
    width,
    height,
    tileSize: t,
    tiles: count,
    power: out,
    mean: count > 0 ? meanSum / count : 0,
    coarse: count > 0 ? Math.max(0, meanSquares / count - (meanSum / count) ** 2) : 0,
    grid: { columns: layout.columns, rows: layout.rows, bins, binSize: BIN, power: grid },
    ...(src.sourceFrames !== undefined && src.sourceFrames > 1 ? { frames: src.sourceFrames } : {}),
  };
}
