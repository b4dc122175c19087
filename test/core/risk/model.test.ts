import { describe, expect, it } from 'vitest';
import { analyzeSpectrum } from '../../../src/core/spectrum/index.js';
import {
  aliasFrequency,
  assessRisk,
  gaussianResponse,
  levelOf,
  nyquistOf,
  scoreOf,
} from '../../../src/core/risk/index.js';
import { grating, greyRaster, noise } from './patterns.js';
import { handPlan } from './render-helpers.js';

const planOf = (w: number, h: number, sx: number, sy = sx) => handPlan(w, h, sx, sy);
const none = () => 1;
const gauss = (sigma: number) => (_a: 'x' | 'y', f: number) => gaussianResponse(sigma, f);

describe('alias frequency and Nyquist', () => {
  // Sampling theorem (Shannon 1949; Nyquist 1928), worked values from CHECKS.md.
  it.each([
    [0.45, 2, 0.1],
    [0.3, 2, 0.4],
    [0.45, 4, 0.2],
    [0.1, 2, 0.2],
  ])('f = %f decimated by %i lands at %f cycles per output px', (f, s, expected) => {
    expect(aliasFrequency(s, f)).toBeCloseTo(expected, 12);
  });
  it('puts the new Nyquist at 0.5 / s', () => {
    expect(nyquistOf(2)).toBe(0.25);
    expect(nyquistOf(5.33)).toBeCloseTo(0.0938, 4);
  });
});

describe('folded fraction', () => {
  const white = analyzeSpectrum(greyRaster(512, 512, noise(512, 512, 0.2, 4)));

  // White noise has a flat spectrum over the square |fx|, |fy| <= 0.5 (unit area); with no
  // filter the share outside the Nyquist square of side 1/s is 1 - 1/s^2 (sampling theorem).
  it.each([1, 1.5, 2, 4, 8])('of white noise with no filter at s = %f is 1 - 1/s^2', (s) => {
    const r = assessRisk(white, planOf(512, 512, s), none);
    expect(r.folded.unfiltered).toBeCloseTo(1 - 1 / (s * s), 1);
    expect(Math.abs(r.folded.unfiltered - (1 - 1 / (s * s)))).toBeLessThan(0.03);
    expect(r.folded.planned).toBeCloseTo(r.folded.unfiltered, 12);
  });

  // Gaussian H(f) = exp(-2 pi^2 sigma^2 f^2) (CHECKS.md): for a flat spectrum the folded share
  // is A_all^2 - A_in^2 with A = integral of H^2 over |f| <= 0.5 resp. |f| <= 0.5/s
  // (numerical quadrature here, independent of the code under test).
  it.each([
    [2, 0.8],
    [4, 1.5],
    [3, 0.5],
  ])('of white noise behind a Gaussian at s = %f, sigma = %f follows the integral', (s, sigma) => {
    const integral = (limit: number) => {
      let acc = 0;
      const steps = 20000;
      for (let i = 0; i < steps; i++) {
        const f = -limit + ((i + 0.5) * 2 * limit) / steps;
        acc += gaussianResponse(sigma, f) ** 2 * ((2 * limit) / steps);
      }
      return acc;
    };
    const expected = integral(0.5) ** 2 - integral(0.5 / s) ** 2;
    const r = assessRisk(white, planOf(512, 512, s), gauss(sigma));
    expect(Math.abs(r.folded.planned - expected)).toBeLessThan(0.1 * expected + 0.005);
  });

  it('is all of a grating beyond the new Nyquist and none of one inside it', () => {
    const spec = analyzeSpectrum(greyRaster(512, 512, grating(0.3)));
    expect(assessRisk(spec, planOf(512, 512, 2), none).folded.unfiltered).toBeGreaterThan(0.99);
    expect(assessRisk(spec, planOf(512, 512, 1.5), none).folded.unfiltered).toBeLessThan(1e-4);
    // Per axis: the grating runs along x, so shrinking only y folds nothing.
    expect(assessRisk(spec, planOf(512, 512, 1, 4), none).folded.unfiltered).toBeLessThan(1e-4);
  });
});

describe('score and level', () => {
  it('rises monotonically from 0 to 1 with the folded fraction', () => {
    const fractions = [0, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 0.1, 0.5, 1];
    const scores = fractions.map(scoreOf);
    for (let i = 1; i < scores.length; i++) expect(scores[i]).toBeGreaterThanOrEqual(scores[i - 1]);
    expect(scores[0]).toBe(0);
    expect(scores.at(-1)).toBe(1);
    expect(levelOf(1e-5)).toBe('low');
    expect(levelOf(1e-3)).toBe('moderate');
    expect(levelOf(0.05)).toBe('high');
  });
});
