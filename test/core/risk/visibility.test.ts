import { describe, expect, it } from 'vitest';
import { makePlan, planResponse, renderRaster } from '../../../src/core/index.js';
import {
  adaptiveFilter,
  analyzeSpectrum,
  assessRisk,
  contrastThreshold,
  CSS_PIXEL_DEGREES,
  mannosSakrison,
  PEAK_SENSITIVITY,
  viewingAt,
} from '../../../src/core/risk/index.js';
import type { Plan } from '../../../src/core/types.js';
import { greyRaster, linearOf } from './patterns.js';

describe('contrast sensitivity, Mannos & Sakrison (1974) (CHECKS.md)', () => {
  // A(f) = 2.6 (0.0192 + 0.114 f) exp(-(0.114 f)^1.1): peak 0.981 near 8 cycles/degree.
  it('peaks at 0.981 near 8 cycles/degree', () => {
    let best = 0;
    let at = 0;
    for (let f = 0.1; f < 60; f += 0.01) {
      const a = mannosSakrison(f);
      if (a > best) [best, at] = [a, f];
    }
    expect(best).toBeCloseTo(0.981, 3);
    expect(at).toBeGreaterThan(7.5);
    expect(at).toBeLessThan(8.5);
  });

  it('matches the published formula at worked values', () => {
    // By hand: f = 1: 2.6 * 0.1332 * exp(-0.114^1.1) = 0.3356; f = 30: 2.6 * 3.4392 * exp(-3.42^1.1) = 0.1146.
    expect(mannosSakrison(1)).toBeCloseTo(2.6 * 0.1332 * Math.exp(-(0.114 ** 1.1)), 6);
    expect(mannosSakrison(30)).toBeCloseTo(2.6 * (0.0192 + 3.42) * Math.exp(-(3.42 ** 1.1)), 6);
    expect(mannosSakrison(30)).toBeLessThan(mannosSakrison(8) / 5);
  });

  it('puts the threshold at 1 / PEAK_SENSITIVITY at the peak', () => {
    expect(contrastThreshold(7.9)).toBeCloseTo(1 / PEAK_SENSITIVITY, 4);
  });

  // CSS Values and Units Level 4: 1/96 inch at 28 inches.
  it('sees a CSS pixel at 0.0213 degrees, and a density-2 pixel at half that', () => {
    expect(CSS_PIXEL_DEGREES).toBeCloseTo(0.0213, 4);
    expect(viewingAt(2).degreesPerPixel).toBeCloseTo(CSS_PIXEL_DEGREES / 2, 12);
  });
});

describe('beats', () => {
  // The sampling identity (CHECKS.md): cos(2 pi f n) with f = 1/2 - e equals
  // (-1)^n cos(2 pi e n), so the sample amplitude swells and fades with period 1/(2e) = 1/(1 - 2f).
  it('a sampled sinusoid near Nyquist swells and fades with period 1 / (1 - 2f)', () => {
    const f = 0.475;
    const period = 1 / (1 - 2 * f);
    for (let n = 0; n < 200; n++) {
      expect(Math.cos(2 * Math.PI * f * n)).toBeCloseTo((-1) ** n * Math.cos(Math.PI * (1 - 2 * f) * n), 9);
    }
    // The envelope |cos(pi (1 - 2f) n)| repeats every `period` samples.
    expect(Math.abs(Math.cos(Math.PI * (1 - 2 * f) * period))).toBeCloseTo(1, 9);
    expect(period).toBeCloseTo(20, 9);
  });

  // Gratings of amplitude 0.4 on 0.5 in linear light (issue targets), shrunk 4x with the
  // defaults (prefilter=auto resolved from the spectrum as the service does).
  const N = 1024;
  const T = N / 4;
  function keptAt(fraction: number): { kept: number; plan: Plan } {
    const k = Math.round(fraction * 0.5 * T); // whole cycles per output width, cycles per source image
    const f = k / N;
    const src = greyRaster(N, 64, (x) => 0.5 + 0.4 * Math.cos(2 * Math.PI * f * x), 16);
    const req = { sourceWidth: N, sourceHeight: 64, targetWidth: T, targetHeight: 16, kernel: 'auto', prefilter: 'auto', light: 'linear' } as const;
    const first = makePlan(req);
    const a = adaptiveFilter(analyzeSpectrum(src), first, (axis, g) => planResponse(first, axis, g));
    const plan = a ? makePlan({ ...req, adaptiveSigma: a }) : first;
    const out = linearOf(renderRaster(src, plan));
    // Amplitude by projection on the output frequency k / T over the interior columns of row 8.
    let re = 0;
    let im = 0;
    let n = 0;
    for (let x = 16; x < T - 16; x++) {
      const v = out[8 * T + x];
      const p = 2 * Math.PI * (k / T) * (x + 0.5) - 2 * Math.PI * f * 0.5;
      re += v * Math.cos(p);
      im += v * Math.sin(p);
      n++;
    }
    return { kept: (2 * Math.hypot(re, im)) / n / 0.4, plan };
  }

  it('keeps at most 10 % of a grating at 0.95x the new Nyquist (it would beat)', () => {
    const { kept, plan } = keptAt(0.95);
    expect(plan.x.cutoff).toBeLessThan(1);
    expect(kept).toBeLessThan(0.1);
  });

  it('keeps at least 85 % at 0.8x and 98-102 % at 0.5x, unchanged by prefilter=auto', () => {
    const at08 = keptAt(0.8);
    expect(at08.plan.x.cutoff).toBeUndefined();
    expect(at08.kept).toBeGreaterThan(0.85);
    const at05 = keptAt(0.5);
    expect(at05.kept).toBeGreaterThan(0.98);
    expect(at05.kept).toBeLessThan(1.02);
  });

  it('reports a beat below Nyquist as a beat, not a fold, with its period', () => {
    const f = (0.95 * 0.5) / 4;
    const spec = analyzeSpectrum(greyRaster(N, N, (x) => 0.5 + 0.4 * Math.cos(2 * Math.PI * f * x), 16));
    const plan = makePlan({ sourceWidth: N, sourceHeight: N, targetWidth: T, targetHeight: T, kernel: 'auto', prefilter: 'none', light: 'linear' });
    const r = assessRisk(spec, plan, (axis, g) => planResponse(plan, axis, g));
    const top = r.patterns[0];
    expect(top.kind).toBe('beat');
    expect(Math.abs(top.apparent.fx)).toBeCloseTo(1 - 2 * 4 * f, 2);
    expect(top.description).toMatch(/swell and fade every 2\d px/);
    expect(r.level).toBe('high');
  });
});
