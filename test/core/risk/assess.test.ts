import { describe, expect, it } from 'vitest';
import { analyzeSpectrum } from '../../../src/core/spectrum/index.js';
import {
  adaptiveFilter,
  assessRisk,
  CUT_MIN,
  gaussianResponse,
  LOW_DB,
} from '../../../src/core/risk/index.js';
import { gradient, grating, greyRaster, noise } from './patterns.js';
import { handPlan } from './render-helpers.js';

const planOf = (w: number, h: number, s: number, sigma = 0) => handPlan(w, h, s, s, sigma);
const gauss = (sigma: number) => (_a: 'x' | 'y', f: number) => gaussianResponse(sigma, f);
const none = () => 1;

describe('peaks', () => {
  // A sinusoid folds to |s f - round(s f)| (sampling theorem, CHECKS.md worked values).
  it.each([
    [0.3, 2, 0.4],
    [0.45, 2, 0.1],
    [0.45, 4, 0.2],
  ])('names a %f cycles/px grating at s = %i as periodic, landing at %f', (f, s, lands) => {
    const spec = analyzeSpectrum(greyRaster(512, 512, grating(f)));
    const r = assessRisk(spec, planOf(512, 512, s), none);
    const top = r.peaks[0];
    expect(top.kind).toBe('periodic');
    expect(Math.abs(Math.abs(top.fx) - f)).toBeLessThan(0.25 / spec.tileSize);
    expect(Math.abs(top.fy)).toBeLessThan(0.5 / spec.tileSize);
    expect(Math.abs(top.aliasTo.fx - lands)).toBeLessThan((0.25 * s) / spec.tileSize);
    expect(top.power).toBeGreaterThan(0.9);
    expect(top.passed).toBe(1);
    expect(r.reason).toMatch(/folds into coarse bands/);
    expect(r.patterns[0].kind).toBe('fold');
  });

  // 1-px stripes sit on the source's own Nyquist frequency 0.5 (CHECKS.md), the cells that are
  // their own conjugates; decimated by 2.5 they land at |2.5 * 0.5 - round(1.25)| = 0.25.
  it.each([['vertical', 'x'], ['horizontal', 'y']] as const)('names %s 1-px stripes as periodic', (_name, axis) => {
    const spec = analyzeSpectrum(greyRaster(256, 256, (x, y) => ((axis === 'x' ? x : y) % 2 ? 0.9 : 0.1)));
    const top = assessRisk(spec, planOf(256, 256, 2.5), none).peaks[0];
    expect(top.kind).toBe('periodic');
    expect(Math.abs(axis === 'x' ? top.fx : top.fy)).toBeCloseTo(0.5, 6);
    expect(Math.abs(axis === 'x' ? top.fy : top.fx)).toBeLessThan(0.5 / spec.tileSize);
    expect(axis === 'x' ? top.aliasTo.fx : top.aliasTo.fy).toBeCloseTo(0.25, 6);
    expect(top.power).toBeGreaterThan(0.9);
    expect(top.power).toBeLessThanOrEqual(1);
  });

  it('calls white noise broadband, never periodic', () => {
    const spec = analyzeSpectrum(greyRaster(512, 512, noise(512, 512, 0.3, 5)));
    const r = assessRisk(spec, planOf(512, 512, 2), none);
    expect(r.peaks.every((p) => p.kind === 'broadband')).toBe(true);
  });

  it('reports the filter attenuation of each peak', () => {
    const spec = analyzeSpectrum(greyRaster(512, 512, grating(0.3)));
    const r = assessRisk(spec, planOf(512, 512, 2, 1), gauss(1));
    expect(r.peaks[0].passed).toBeCloseTo(gaussianResponse(1, Math.abs(r.peaks[0].fx)) ** 2, 3);
  });

  it('finds no peaks in a smooth gradient', () => {
    const spec = analyzeSpectrum(greyRaster(512, 512, gradient(512)));
    expect(assessRisk(spec, planOf(512, 512, 4), none).peaks).toEqual([]);
  });
});

describe('recommended sigma', () => {
  // Gaussian response H(f) = exp(-2 pi^2 sigma^2 f^2) (CHECKS.md): the recommended sigma,
  // applied as the only filter, must bring the folded energy under -40 dB.
  const under = (f: number) => 10 * Math.log10(f) < LOW_DB;
  it.each([2, 3, 4])('brings the folded energy of a noisy grating at s = %i under -40 dB', (s) => {
    const rnd = noise(512, 512, 0.1, 8);
    const g = grating(0.4, 0.3, 0.3);
    const spec = analyzeSpectrum(greyRaster(512, 512, (x, y) => g(x, y) + rnd(x, y) - 0.5));
    const first = assessRisk(spec, planOf(512, 512, s), none);
    expect(first.level).toBe('high');
    const sigma = first.recommendedSigma.x;
    expect(first.recommendedSigma.y).toBeCloseTo(sigma, 12);
    const second = assessRisk(spec, planOf(512, 512, s, sigma), gauss(sigma));
    expect(under(second.folded.planned)).toBe(true);
    expect(second.level).toBe('low');
    // ...and it is the least such sigma (within the search step): 10 % less is not under.
    const less = assessRisk(spec, planOf(512, 512, s, 0.9 * sigma), gauss(0.9 * sigma));
    expect(under(less.folded.planned)).toBe(false);
  });

  it('keeps the planned sigma when the plan is already low', () => {
    const spec = analyzeSpectrum(greyRaster(256, 256, gradient(256)));
    const r = assessRisk(spec, planOf(256, 256, 2, 0.7), gauss(0.7));
    expect(r.level).toBe('low');
    expect(r.recommendedSigma.x).toBeCloseTo(0.7, 12);
  });
});

describe('adaptiveFilter', () => {
  it('changes nothing on a source where nothing would show', () => {
    const spec = analyzeSpectrum(greyRaster(256, 256, gradient(256)));
    expect(adaptiveFilter(spec, planOf(256, 256, 3), none)).toBeUndefined();
  });

  // The response at cut-off factor c is H(f / c): with a Gaussian plan response, lowering the
  // cut-off of a 1.2x-Nyquist grating's axis only (fx = 0.3 at s = 2; the grating is vertical
  // stripes, so y is left alone), within CUT_MIN.
  it('lowers only the offending axis, within CUT_MIN, and the margin falls', () => {
    const spec = analyzeSpectrum(greyRaster(512, 512, grating(0.3)));
    const plan = planOf(512, 512, 2);
    const a = adaptiveFilter(spec, plan, gauss(0.5));
        expect(a?.x).toBe(0);
    expect(a!.cutoff!.x).toBeLessThan(1);
    expect(a!.cutoff!.x).toBeGreaterThanOrEqual(CUT_MIN);
    expect(a!.cutoff!.y).toBe(1);
    const before = assessRisk(spec, plan, gauss(0.5));
    const c = a!.cutoff!.x;
    const after = assessRisk(spec, plan, (axis, f) => gaussianResponse(0.5, axis === 'x' ? f / c : f));
    // A Gaussian of sigma 0.5 is too gentle a low-pass to stop 0.3 cycles/px at any cut-off
    // above CUT_MIN: auto stops at its floor, and the report says so.
    expect(c).toBeCloseTo(CUT_MIN, 9);
    expect(after.margin).toBeLessThan(before.margin / 2);
  });
});

describe('region grid', () => {
  it('marks the region that holds the grating and not the flat ones', () => {
    const w = 1024;
    const h = 1024;
    const g = grating(0.4, 0.5);
    const spec = analyzeSpectrum(greyRaster(w, h, (x, y) => (x < 256 && y < 256 ? g(x, y) : 0.5)));
    const r = assessRisk(spec, planOf(w, h, 3), none);
    const { columns, rows, cells } = r.grid;
    expect(columns * rows).toBe(cells.length);
    expect(cells[0]).toBeGreaterThan(0.75);
    expect(cells[columns * rows - 1]).toBe(0);
    expect(Math.max(...cells.slice(columns * 4))).toBe(0);
  });

  it('gives the region with the grating its margin in threshold units, and the flat ones none', () => {
    const w = 1024;
    const h = 1024;
    const g = grating(0.4, 0.5);
    const spec = analyzeSpectrum(greyRaster(w, h, (x, y) => (x < 256 && y < 256 ? g(x, y) : 0.5)));
    const r = assessRisk(spec, planOf(w, h, 3), none);
    const { columns, rows, margins } = r.grid;
    expect(margins.length).toBe(columns * rows);
    // The fold of a grating covering one region in k: that region holds k times the regions'
    // mean energy of the line, so it shows the pattern at sqrt(k) times the picture's margin.
    const k = margins.filter((m) => m > 0).length;
    expect(k).toBeGreaterThanOrEqual(1);
    expect(margins[0]).toBeGreaterThan(r.margin);
    expect(margins[0]).toBeLessThanOrEqual(r.margin * Math.sqrt(columns * rows) * 1.001);
    expect(margins[columns * rows - 1]).toBeLessThan(0.01 * margins[0]);
  });
});

describe('cropped renditions', () => {
  // A cover crop renders only part of the source: what folds is what that part holds.
  const w = 1024;
  const h = 512;
  const g = grating(0.3, 0.2);
  const spec = analyzeSpectrum(greyRaster(w, h, (x, y) => (x < 256 ? g(x, y) : 0.5 + 0.02 * Math.cos(x / 40)), 16));
  const cropped = (x: number, width: number) => ({ ...planOf(w, h, 2), crop: { x, y: 0, width, height: h } });

  it('folds nothing where the crop leaves the pattern out', () => {
    const whole = assessRisk(spec, planOf(w, h, 2), none);
    const right = assessRisk(spec, cropped(512, 512), none);
    expect(whole.level).toBe('high');
    expect(right.folded.unfiltered).toBeLessThan(whole.folded.unfiltered / 100);
    expect(right.level).not.toBe('high');
    expect(right.margin).toBeLessThan(whole.margin / 10);
  });

  it('folds more where the crop holds only the pattern', () => {
    const whole = assessRisk(spec, planOf(w, h, 2), none);
    const left = assessRisk(spec, cropped(0, 256), none);
    expect(left.folded.unfiltered).toBeGreaterThan(whole.folded.unfiltered);
    expect(left.folded.unfiltered).toBeLessThanOrEqual(1);
  });
});
