import { describe, expect, it } from 'vitest';
import { analyzeSpectrum } from '../../../src/core/spectrum/index.js';
import { layoutTiles, MAX_TILES } from '../../../src/core/spectrum/tiles.js';
import type { PixelRaster } from '../../../src/core/types.js';
import { grating, greyRaster, noise } from '../risk/patterns.js';

function sum(a: Float32Array): number {
  let s = 0;
  for (const v of a) s += v;
  return s;
}

/** Index of the strongest cell of a centred side-n spectrum, as (fx, fy). */
function strongest(power: Float32Array, n: number): { fx: number; fy: number } {
  let best = 0;
  for (let i = 1; i < power.length; i++) if (power[i] > power[best]) best = i;
  return { fx: ((best % n) - n / 2) / n, fy: (Math.floor(best / n) - n / 2) / n };
}

describe('analyzeSpectrum', () => {
  // Welch (1967): with the periodogram normalised by U = sum w^2, white noise of variance v has
  // expected power v in every cell. Uniform noise of half-width a has variance a^2 / 3.
  it('reads the variance of white noise in every cell', () => {
    const a = 0.2;
    const src = greyRaster(512, 512, noise(512, 512, a, 9));
    const spec = analyzeSpectrum(src);
    expect(spec.tileSize).toBe(128);
    const n = spec.tileSize;
    const mean = sum(spec.power) / (n * n);
    expect(mean).toBeGreaterThan(0.95 * ((a * a) / 3));
    expect(mean).toBeLessThan(1.05 * ((a * a) / 3));
    // Flat: the low and high quarters of the band hold the same power within 10 %.
    let low = 0;
    let high = 0;
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        const r = Math.max(Math.abs(i - n / 2), Math.abs(j - n / 2));
        if (r > 2 && r < n / 4) low += spec.power[j * n + i];
        if (r >= n / 4) high += spec.power[j * n + i];
      }
    }
    const lowCells = (n / 2) ** 2 - 25;
    const highCells = n * n - (n / 2) ** 2;
    expect(low / lowCells / (high / highCells)).toBeGreaterThan(0.9);
    expect(low / lowCells / (high / highCells)).toBeLessThan(1.1);
  });

  // A grating cos(2 pi f x) puts its power at +-f (Fourier; e.g. Bracewell, "The Fourier
  // Transform and its Applications"). Mean-square of amplitude a is a^2 / 2 (Parseval).
  it.each([
    [0.3, 0],
    [0.125, Math.PI / 2],
  ])('finds a %f cycles/px grating at its frequency with its energy', (f, angle) => {
    const a = 0.3;
    const spec = analyzeSpectrum(greyRaster(600, 400, grating(f, angle, a)));
    const n = spec.tileSize;
    const peak = strongest(spec.power, n);
    const fx = Math.abs(peak.fx);
    const fy = Math.abs(peak.fy);
    expect(Math.hypot(fx - f * Math.cos(angle), fy - f * Math.sin(angle))).toBeLessThanOrEqual(1 / n);
    // Parseval over the windowed tile: sum P / n^2 = mean square of the zero-mean signal.
    expect(sum(spec.power) / (n * n)).toBeCloseTo((a * a) / 2, 2);
  });

  it('keeps the DC cell empty (windowed mean removed) and a flat field has no energy', () => {
    const spec = analyzeSpectrum(greyRaster(256, 256, noise(256, 256, 0.1, 2)));
    const n = spec.tileSize;
    expect(spec.power[(n / 2) * n + n / 2]).toBeLessThan(1e-9);
    const flat = analyzeSpectrum(greyRaster(300, 200, () => 0.3));
    expect(sum(flat.power)).toBeLessThan(1e-12);
  });

  // Linear light: codes 50/200 alternate columns -> linear 0.0318960 / 0.577580 (CHECKS.md,
  // IEC 61966-2-1), so the energy is that of a square wave of amplitude 0.272842, not of 75/255.
  it('measures energy in linear light, not in code values', () => {
    const w = 256;
    const data = new Uint8Array(w * w);
    for (let i = 0; i < data.length; i++) data[i] = i % 2 === 0 ? 50 : 200;
    const spec = analyzeSpectrum({ data, width: w, height: w, channels: 1 });
    const n = spec.tileSize;
    const amplitude = (0.57758 - 0.031896) / 2;
    expect(sum(spec.power) / (n * n)).toBeCloseTo(amplitude * amplitude, 3);
  });

  // ITU-R BT.709-6: Y = 0.2126 R + 0.7152 G + 0.0722 B, so a grating in one channel carries
  // that coefficient squared of the energy.
  it.each([
    [0, 0.2126],
    [1, 0.7152],
    [2, 0.0722],
  ])('weights channel %i by its Rec. 709 coefficient %f', (channel, k) => {
    const w = 256;
    const grey = greyRaster(w, w, grating(0.2, 0, 0.3));
    const rgba = new Uint16Array(w * w * 4).fill(0);
    for (let i = 0; i < w * w; i++) {
      rgba[4 * i + channel] = grey.data[i];
      rgba[4 * i + 3] = 65535;
    }
    const ref = sum(analyzeSpectrum(grey).power);
    const one = sum(analyzeSpectrum({ data: rgba, width: w, height: w, channels: 4 }).power);
    expect(one / ref).toBeCloseTo(k * k, 4);
  });

  it('sees nothing through alpha 0 (premultiplied)', () => {
    const w = 128;
    const grey = greyRaster(w, w, grating(0.3));
    const ga = new Uint16Array(w * w * 2);
    for (let i = 0; i < w * w; i++) ga[2 * i] = grey.data[i];
    expect(sum(analyzeSpectrum({ data: ga, width: w, height: w, channels: 2 }).power)).toBe(0);
  });

  it('keeps per-region spectra: a grating on the left half shows in the left regions only', () => {
    const w = 1024;
    const h = 512;
    const src = greyRaster(w, h, (x, y) => (x < w / 2 ? grating(0.35)(x, y) : 0.5));
    const spec = analyzeSpectrum(src);
    const { columns, rows, bins, power } = spec.grid;
    expect(columns).toBe(8);
    expect(rows).toBe(4);
    const energy = (r: number) => sum(power.subarray(r * bins * bins, (r + 1) * bins * bins));
    for (let r = 0; r < rows; r++) {
      expect(energy(r * columns + 1)).toBeGreaterThan(0.05);
      expect(energy(r * columns + 6)).toBeLessThan(1e-9);
    }
  });

  it('with `rowAt`, asks each tile\'s rows in order, tiles in row order (a file still being written can serve them)', () => {
    const whole = greyRaster(700, 460, noise(700, 460, 0.2, 5), 8);
    const asked: number[] = [];
    const spec = analyzeSpectrum({ ...whole, data: new Uint8Array(0) }, {
      rowAt: (y) => (asked.push(y), { data: whole.data, at: y * 700 }),
    });
    expect(spec).toEqual(analyzeSpectrum(whole));
    const t = spec.tileSize;
    expect(asked.length).toBe(spec.tiles * t);
    const starts: number[] = [];
    for (let k = 0; k < spec.tiles; k++) {
      const rows = asked.slice(k * t, (k + 1) * t);
      expect(rows).toEqual(Array.from({ length: t }, (_, i) => rows[0] + i));
      starts.push(rows[0]);
    }
    expect(starts.every((y, i) => i === 0 || y >= starts[i - 1])).toBe(true);
    // The last tiles reach the bottom row.
    expect(starts[starts.length - 1] + t).toBe(460);
  });

  it('rejects a raster shorter than its size', () => {
    const bad: PixelRaster = { data: new Uint8Array(10), width: 10, height: 10, channels: 1 };
    expect(() => analyzeSpectrum(bad)).toThrow(RangeError);
    const half = { data: new Uint8Array(300), width: 10, height: 10, channels: 2.5 } as unknown as PixelRaster;
    expect(() => analyzeSpectrum(half)).toThrow(RangeError);
    expect(() => analyzeSpectrum({ ...bad, channels: Number.NaN } as unknown as PixelRaster)).toThrow(RangeError);
  });
});

describe('layoutTiles', () => {
  it.each([
    [4000, 3000],
    [1024, 768],
    [300, 5000],
    [64, 64],
    [9, 9],
  ])('keeps every tile inside a %ix%i image and within the tile budget', (w, h) => {
    const l = layoutTiles(w, h);
    expect(l.region.length).toBeLessThanOrEqual(MAX_TILES);
    expect(l.region.length).toBeGreaterThan(0);
    const seen = new Set<number>();
    for (let k = 0; k < l.region.length; k++) {
      expect(l.corners[2 * k]).toBeGreaterThanOrEqual(0);
      expect(l.corners[2 * k] + l.tileSize).toBeLessThanOrEqual(w);
      expect(l.corners[2 * k + 1] + l.tileSize).toBeLessThanOrEqual(h);
      seen.add(l.region[k]);
    }
    expect(seen.size).toBe(l.columns * l.rows);
  });

  it('gives up on images too small for a 4-pixel tile', () => {
    expect(layoutTiles(3, 100).tileSize).toBe(0);
  });
});
