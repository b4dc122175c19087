import { describe, expect, it } from 'vitest';
import { makePlan, planResponseOf } from '../../src/core/index.js';
import { adaptiveFilter, analyzeSpectrum, planGains } from '../../src/core/risk/index.js';
import { decide, gainsOf } from '../../src/pool/analysis.js';
import { raw8 } from '../helpers/images.js';

const plan = (sourceWidth: number, targetWidth: number) => {
  const targetHeight = Math.round((600 * targetWidth) / sourceWidth);
  return makePlan({ sourceWidth, sourceHeight: 600, targetWidth, targetHeight, kernel: 'auto', prefilter: 'auto', light: 'linear' });
};

/** A grating at 0.275 cycles/px along x (above the new Nyquist of a 2x reduction) and a slower one along y. */
const grating = (width: number, height: number) => ({
  data: raw8(width, height, 3, (x, y) => {
    const v = Math.round(255 * (0.5 + 0.3 * Math.cos(2 * Math.PI * 0.275 * x) + 0.15 * Math.sin(2 * Math.PI * 0.04 * y)));
    return [v, v, v];
  }),
  width,
  height,
  channels: 3 as const,
});

describe('the sampled plan response kept per thread (pool/analysis.ts gainsOf)', () => {
  it('gives an equal plan (a new object) the response made before, and another plan or tile size its own', () => {
    const a = gainsOf(plan(1000, 400), 128);
    expect(gainsOf(plan(1000, 400), 128)).toBe(a);
    expect(gainsOf(plan(1000, 500), 128)).not.toBe(a);
    expect(gainsOf(plan(1000, 400), 64)).not.toBe(a);
    expect(gainsOf(plan(1000, 400), 64)?.tileSize).toBe(64);
    // A source too small for a tile has no spectrum tiles to sample against.
    expect(gainsOf(plan(1000, 400), 0)).toBeUndefined();
  });

  it('holds the same values as a response made afresh, after another plan\'s was made', () => {
    const p = plan(1200, 480);
    gainsOf(p, 128);
    const other = gainsOf(plan(1200, 600), 128)!;
    const kept = gainsOf(p, 128)!;
    const fresh = planGains(p, planResponseOf(p), 128);
    const freqs = [0, 0.05, 0.13, 0.2, 0.21, 0.29, 0.37, 0.5];
    for (const f of freqs) {
      expect(kept.hx(f)).toBe(fresh.hx(f));
      expect(kept.hy(f)).toBe(fresh.hy(f));
    }
    // The other plan's response differs, so a mix-up would show.
    expect(freqs.some((f) => other.hx(f) !== fresh.hx(f))).toBe(true);
  });

  it('keeps the 64 last used: a plan left unused while 64 others are made is made again', () => {
    const first = gainsOf(plan(2000, 300), 32);
    for (let w = 301; w <= 364; w++) gainsOf(plan(2000, w), 32);
    expect(gainsOf(plan(2000, 300), 32)).not.toBe(first);
    // One used again in the meantime stays.
    const kept = gainsOf(plan(2000, 700), 32);
    for (let w = 400; w < 463; w++) {
      gainsOf(plan(2000, w), 32);
      if (w % 8 === 0) gainsOf(plan(2000, 700), 32);
    }
    expect(gainsOf(plan(2000, 700), 32)).toBe(kept);
  });

  it('decides as adaptiveFilter does with the response made afresh', () => {
    const spectrum = analyzeSpectrum(grating(1000, 600));
    const p = plan(1000, 500);
    const expected = adaptiveFilter(spectrum, p, planResponseOf(p), planGains(p, planResponseOf(p), spectrum.tileSize));
    // The grating folds at 2x (sampling theorem, CHECKS.md): the filter lowers the x cut-off.
    expect(expected?.cutoff?.x).toBeLessThan(1);
    // The first decision makes the response, the second finds it kept.
    expect(decide(spectrum, p)).toEqual(expected);
    expect(decide(spectrum, p)).toEqual(expected);
  });
});
