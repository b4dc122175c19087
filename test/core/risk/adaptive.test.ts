import { describe, expect, it } from 'vitest';
import { makePlan, renderRaster } from '../../../src/core/index.js';
import { adaptiveFilter, analyzeSpectrum, assessRisk } from '../../../src/core/risk/index.js';
import type { AdaptiveFilter, Plan } from '../../../src/core/types.js';
import { powerSpectrum } from './measure.js';
import { gradient, greyRaster, linearOf, type Pattern } from './patterns.js';
import { responseOf, squarePlan } from './render-helpers.js';

const N = 512;

/** A sum of gratings, each [kx, ky, amplitude] in whole cycles per image (periodic on N x N). */
type Parts = Array<[number, number, number]>;
const sumOf = (parts: Parts): Pattern => (x, y) =>
  parts.reduce((v, [kx, ky, a]) => v + a * Math.cos((2 * Math.PI * (kx * x + ky * y)) / N), 0.5);

/**
 * Power of the rendered output (fft.js, CHECKS.md) at the bins where each part lands: a part
 * of k cycles per image lands, after decimation to M = N / s pixels, on bin k mod M (sampling
 * theorem, Shannon 1949). A 3 x 3 neighbourhood absorbs the leakage of the borders (mirrored, not periodic).
 */
function powerAt(out: Float64Array, m: number, parts: Parts): number {
  const p = powerSpectrum(out, m);
  let sum = 0;
  for (const [kx, ky] of parts) {
    for (const sign of [1, -1]) {
      const u = (((sign * kx) % m) + m) % m;
      const v = (((sign * ky) % m) + m) % m;
      for (let dv = -1; dv <= 1; dv++) for (let du = -1; du <= 1; du++) sum += p[((v + dv + m) % m) * m + ((u + du + m) % m)];
    }
  }
  return sum;
}

function withAdaptive(plan: Plan, extra: AdaptiveFilter | undefined): Plan {
  return makePlan({
    sourceWidth: N,
    sourceHeight: N,
    targetWidth: plan.targetWidth,
    targetHeight: plan.targetHeight,
    kernel: 'auto',
    prefilter: 'auto',
    light: 'linear',
    adaptiveSigma: extra,
  });
}

const db = (v: number) => (10 * Math.log10(v)).toFixed(1);

describe('prefilter=auto with the content-adaptive cut-off', () => {
  // Periodic content just past the new Nyquist frequency (1.1x), alone or beside in-band
  // content: the planned filter's transition band lets it fold, so the level is high.
  const risky: Array<[string, number, Parts, Parts]> = [
    ['grating 0.275 at s = 2', 2, [[141, 0, 0.4]], []],
    ['grating 0.137 at s = 4', 4, [[70, 0, 0.4]], []],
    ['plaid 0.051 + 0.275 at s = 2', 2, [[0, 141, 0.2]], [[26, 0, 0.2]]],
    ['oblique (0.137, 0.039) at s = 4', 4, [[70, 20, 0.3]], [[10, 5, 0.1]]],
  ];

  it.each(risky)('lowers the measured alias energy of %s', (name, s, beyond, inside) => {
    const src = greyRaster(N, N, sumOf([...beyond, ...inside]), 8);
    const spec = analyzeSpectrum(src);
    const fixed = squarePlan(N, s);
    expect(assessRisk(spec, fixed, responseOf(fixed)).level).toBe('high');
    const extra = adaptiveFilter(spec, fixed, responseOf(fixed));
    expect(extra).toBeDefined();
    const adaptive = withAdaptive(fixed, extra);
    const m = fixed.targetWidth;
    const before = linearOf(renderRaster(src, fixed));
    const after = linearOf(renderRaster(src, adaptive));
    const aliasBefore = powerAt(before, m, beyond);
    const aliasAfter = powerAt(after, m, beyond);
    const keptBefore = inside.length ? powerAt(before, m, inside) : 1;
    const keptAfter = inside.length ? powerAt(after, m, inside) : 1;
    console.log(
      `${name}: cut-off ${extra!.cutoff!.x.toFixed(2)}, ${extra!.cutoff!.y.toFixed(2)}; alias ${db(aliasBefore)} -> ${db(aliasAfter)} dB` +
        (inside.length ? `; in-band kept ${((100 * keptAfter) / keptBefore).toFixed(1)} %` : ''),
    );
    expect(aliasAfter).toBeLessThan(aliasBefore / 2);
    // Only the band near the new Nyquist: in-band content well below it keeps its power.
    expect(keptAfter / keptBefore).toBeGreaterThan(0.95);
  });

  // Where nothing would show, the rendition is exactly the fixed plan's: no change, no loss.
  // 136 cycles per 512 px at s = 1.5 is 0.4 cycles per output px (0.8x Nyquist): it passes cleanly.
  const calm: Array<[string, number, Pattern, 8 | 16]> = [
    ['grating 0.051 at s = 2', 2, sumOf([[26, 0, 0.4]]), 8],
    ['grating 0.199 at s = 2', 2, sumOf([[102, 0, 0.4]]), 8],
    ['grating 0.266 at s = 1.5', 1.5, sumOf([[136, 0, 0.4]]), 8],
    ['smooth gradient at s = 4', 4, gradient(N), 16],
  ];

  it.each(calm)('leaves %s untouched', (_name, s, pattern, bits) => {
    const src = greyRaster(N, N, pattern, bits);
    const spec = analyzeSpectrum(src);
    const fixed = squarePlan(N, s);
    expect(assessRisk(spec, fixed, responseOf(fixed)).level).not.toBe('high');
    const extra = adaptiveFilter(spec, fixed, responseOf(fixed));
    expect(extra).toBeUndefined();
    const a = renderRaster(src, fixed);
    const b = renderRaster(src, withAdaptive(fixed, extra));
    expect(Buffer.from(b.data.buffer).equals(Buffer.from(a.data.buffer))).toBe(true);
  });
});
