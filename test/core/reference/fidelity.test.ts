import { describe, expect, it } from 'vitest';
import { makePlan, renderRaster } from '../../../src/core/index.js';
import type { PixelRaster } from '../../../src/core/types.js';
import { zonePlate, grating, step, stripes } from '../../../scripts/fidelity/patterns.js';
import { zoneFigures, gratingKept, overshoot, innerMeanCode, type Output } from '../../../scripts/fidelity/measures.js';

function defaults(src: PixelRaster, w: number, h: number): Output {
  const plan = makePlan({ sourceWidth: src.width, sourceHeight: src.height, targetWidth: w, targetHeight: h, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  return { data: renderRaster(src, plan).data as Uint8Array, width: w, height: h, sx: src.width / w, sy: src.height / h };
}

// Assertions keep a margin below what scripts/fidelity.ts prints (N = 1024 there), so they
// guard regressions without being brittle: the stated targets are -40 dB and 85 %.
describe('fidelity of the defaults on analytic patterns', () => {
  const n = 512;
  const zone = zonePlate(n);
  // Zone plate: local frequency r / N (Schuler 2014, CHECKS.md); beyond 1.3x the new Nyquist
  // everything must vanish (sampling theorem, Shannon 1949).
  it.each([[2], [4], [8]])('zone plate downscaled %ix: residual <= -36 dB (-33 at 8x), passband <= -36 dB, stop mean 188 +- 1', (s) => {
    const z = zoneFigures(defaults(zone.raster, n / s, n / s), n, zone.at);
    expect(z.residualDb).toBeLessThanOrEqual(s === 8 ? -33 : -36);
    if (s < 8) expect(z.passbandDb).toBeLessThanOrEqual(-36);
    expect(Math.abs(z.stopMeanCode - 188)).toBeLessThanOrEqual(1);
  });

  it.each([[2], [4]])('gratings at %ix: 98-102 percent at 0.5x Nyquist and >= 85 percent at 0.8x', (s) => {
    for (const [frac, lo, hi] of [[0.5, 0.98, 1.02], [0.8, 0.85, 1.02]]) {
      const f = (frac * 0.5) / s;
      const g = grating(1024, 8, f);
      const kept = gratingKept(defaults(g.raster, 1024 / s, 8 / s), f, 0.4);
      expect(kept).toBeGreaterThanOrEqual(lo);
      expect(kept).toBeLessThanOrEqual(hi);
    }
  });

  // A step downscaled 4x at each of the four edge phases. Any low-pass this sharp rings at a
  // hard edge (the ideal low-pass's Gibbs overshoot is 8.95 % of the step, Wilbraham-Gibbs
  // constant, from memory); the default kernel's ringing limiter (resample/limit.ts) clamps
  // each output to the range of the source under the central lobe, so the target of
  // <= 3 % holds at the worst phase. Lanczos-3 asked by name has no limiter and rings beyond
  // it at some phase, so the check discriminates.
  it('a step downscaled 4x overshoots <= 3 % at every phase with the defaults, more with lanczos-3', () => {
    let lanczos = 0;
    for (const edge of [256, 257, 258, 259]) {
      const st = step(512, 8, edge, 0.2, 0.8);
      expect(overshoot(defaults(st.raster, 128, 2), st.at(0, 0), st.at(511, 0))).toBeLessThanOrEqual(0.03);
      const plan = makePlan({ sourceWidth: 512, sourceHeight: 8, targetWidth: 128, targetHeight: 2, kernel: 'lanczos-3', prefilter: 'none', light: 'linear' });
      const out = { data: renderRaster(st.raster, plan).data as Uint8Array, width: 128, height: 2, sx: 4, sy: 4 };
      lanczos = Math.max(lanczos, overshoot(out, st.at(0, 0), st.at(511, 0)));
    }
    expect(lanczos).toBeGreaterThan(0.05);
  });

  it('1-px stripes halve to 188 +- 1 (CHECKS.md)', () => {
    expect(Math.abs(innerMeanCode(defaults(stripes(128, 32).raster, 64, 16)) - 188)).toBeLessThanOrEqual(1);
  });

  it('a triangle filter misses the residual target the default meets (the check discriminates)', () => {
    const plan = makePlan({ sourceWidth: n, sourceHeight: n, targetWidth: 128, targetHeight: 128, kernel: 'triangle', prefilter: 'none', light: 'linear' });
    const out = { data: renderRaster(zone.raster, plan).data as Uint8Array, width: 128, height: 128, sx: 4, sy: 4 };
    expect(zoneFigures(out, n, zone.at).residualDb).toBeGreaterThan(-36);
  });
});
