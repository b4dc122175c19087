import { describe, expect, it } from 'vitest';
import { renderRaster } from '../../../src/core/index.js';
import { analyzeSpectrum, assessRisk } from '../../../src/core/risk/index.js';
import { naivePlan, responseOf, squarePlan } from './render-helpers.js';
import { gradient, grating, greyRaster, linearOf, zonePlate } from './patterns.js';
import { rowPeak } from './measure.js';

describe('gratings decimated with prefilter=none', () => {
  // Sampling theorem (Shannon 1949; Nyquist 1928; CHECKS.md): a sinusoid of f cycles/px sampled
  // every s pixels appears at |s f - round(s f)| cycles per output pixel. Worked values from
  // CHECKS.md: 0.3 by 2 -> 0.4, 0.45 by 2 -> 0.1, 0.45 by 4 -> 0.2; and 0.3 by 4 -> 1.2 -> 0.2.
  it.each([
    [0.3, 2, 0.4],
    [0.45, 2, 0.1],
    [0.3, 4, 0.2],
    [0.45, 4, 0.2],
  ])('%f cycles/px by %i: reported and rendered moiré sit at %f', (f, s, expected) => {
    expect(Math.abs(s * f - Math.round(s * f))).toBeCloseTo(expected, 12);
    const n = 512;
    const src = greyRaster(n, n, grating(f), 8);
    const plan = naivePlan(n, s);
    const report = assessRisk(analyzeSpectrum(src), plan, responseOf(plan));
    const peak = report.peaks[0];
    expect(peak.kind).toBe('periodic');
    const out = renderRaster(src, plan);
    const bin = 1 / out.width;
    // Measured: the strongest frequency in the FFT (fft.js) of the rows actually rendered.
    const measured = rowPeak(linearOf(out), out.width, out.height);
    expect(Math.abs(measured - expected)).toBeLessThan(0.5 * bin);
    expect(Math.abs(peak.aliasTo.fx - expected)).toBeLessThan(0.5 * bin);
    expect(Math.abs(peak.aliasTo.fx - measured)).toBeLessThan(bin);
    expect(peak.aliasTo.fy).toBeLessThan(0.5 * bin);
    expect(report.level).toBe('high');
  });
});

describe('zone plate', () => {
  const n = 512;
  // Schuler (2014): the zone plate 0.5 + 0.5 cos(pi r^2 / N) has local frequency (x, y) / N, so
  // on an N x N grid its spectrum is flat over |fx|, |fy| <= 0.5 and a decimation by s folds
  // 1 - 1/s^2 of its energy (sampling theorem). The Hann-weighted tiles see the outer half-tile
  // of the image (the plate's highest frequencies) less, hence the tolerance, and the formula
  // is checked only where the folding band lies deeper inside the image (s >= 2).
  const spec = analyzeSpectrum(greyRaster(n, n, zonePlate(n), 8));

  it('folds more of its energy the more it is shrunk, near 1 - 1/s^2', () => {
    let last = -1;
    for (const s of [1.25, 1.5, 2, 3, 4]) {
      const plan = naivePlan(n, s);
      const folded = assessRisk(spec, plan, responseOf(plan)).folded.unfiltered;
      expect(folded).toBeGreaterThan(last);
      // Near the formula once the folding band is more than a Hann half-tile from the edge.
      if (s >= 2) expect(Math.abs(folded - (1 - 1 / (s * s)))).toBeLessThan(0.15);
      last = folded;
    }
  });

  // A fixed prefilter (Gaussian sigma 1 px, H = exp(-2 pi^2 sigma^2 f^2), CHECKS.md) lets more
  // through beyond the Nyquist frequency as it drops with s: the score must rise with s.
  it('scores higher the more it is shrunk behind a fixed prefilter', () => {
    const scores = [1.5, 2, 3, 4, 6].map((s) => {
      const plan = squarePlan(n, s, 'nearest-neighbour', 1);
      return assessRisk(spec, plan, responseOf(plan)).score;
    });
    for (let i = 1; i < scores.length; i++) expect(scores[i]).toBeGreaterThan(scores[i - 1]);
    expect(scores[0]).toBeLessThan(0.5);
    expect(scores.at(-1)).toBeGreaterThan(0.5);
  });

  it('scores lower with the planned filter than with naive decimation', () => {
    for (const s of [2, 3, 4, 6]) {
      const plan = squarePlan(n, s);
      const naive = naivePlan(n, s);
      expect(assessRisk(spec, plan, responseOf(plan)).score).toBeLessThan(assessRisk(spec, naive, responseOf(naive)).score);
    }
  });
});

describe('smooth gradient', () => {
  // A linear ramp has no energy near any Nyquist frequency (its spectrum falls off as 1/f^2,
  // and the Hann window's side lobes fall as 1/f^3): the score must be about 0.
  const n = 512;
  const spec = analyzeSpectrum(greyRaster(n, n, gradient(n), 16));
  it.each([2, 4, 8])('scores about 0 at s = %i, planned and naive', (s) => {
    for (const plan of [squarePlan(n, s), naivePlan(n, s)]) {
      const r = assessRisk(spec, plan, responseOf(plan));
      expect(r.score).toBeLessThan(0.05);
      expect(r.level).toBe('low');
      expect(r.peaks).toEqual([]);
    }
  });
});
