import { describe, expect, it } from 'vitest';
import { centralLobes, limitRinging, RING_CREST, RING_FLOOR, RING_SLACK } from '../../../src/core/resample/limit.js';
import { finalTable } from '../../../src/core/resample/axis-table.js';
import { resampleAxis } from '../../../src/core/resample/separable.js';
import type { AxisPlan } from '../../../src/core/types.js';

const axis = (kernel: AxisPlan['kernel'], scale: number): AxisPlan => ({ scale, kernel, sigma: 0, pyramidLevels: 0 });

/** One row through the final table of `kernel` at 4x (256 -> 64 samples). */
function shrink(src: Float32Array, kernel: AxisPlan['kernel']): Float32Array {
  const t = finalTable(256, 0, 256, 64, axis(kernel, 4));
  const out = new Float32Array(64);
  resampleAxis(out, 0, 1, src, 0, 1, 1, t, 0, 64);
  return out;
}

describe('ringing limiter (clamp to the central lobe, resample/limit.ts)', () => {
  it('finds the central lobe of the stretched default: about one output px either side', () => {
    const t = finalTable(256, 0, 256, 64, axis('bandlimit', 4));
    expect(t.lobe).toBeInstanceOf(Int32Array);
    const lobe = t.lobe!;
    // Output 32 sits at source x = 129.5; the Kaiser sinc with cut-off 0.49 crosses zero at
    // 1 / (2 * 0.49) ~ 1.02 output px, i.e. ~4.1 source px either side: 8 taps, from 126.
    expect(lobe[65]).toBe(8);
    expect(lobe[64]).toBe(126);
    expect(finalTable(256, 0, 256, 64, axis('lanczos-3', 4)).lobe).toBeUndefined();
  });

  it('removes the overshoot at a step and leaves a sinusoid at 0.5x Nyquist as it was', () => {
    const stepRow = new Float32Array(256).map((_, i) => (i < 130 ? 0.2 : 0.8));
    const limited = shrink(stepRow, 'bandlimit');
    // At most RING_SLACK of the step beyond it (3 %, the target), where Lanczos-3 rings past 3 %.
    expect(Math.max(...limited)).toBeLessThanOrEqual(0.8 + RING_SLACK * 0.6 + 1e-6);
    expect(Math.min(...limited)).toBeGreaterThanOrEqual(0.2 - RING_SLACK * 0.6 - 1e-6);
    const rings = shrink(stepRow, 'lanczos-3');
    expect(Math.max(...rings)).toBeGreaterThan(0.82);
    // 0.5x the new Nyquist: 1/16 cycles per source px. The clamp changes nothing there.
    const wave = new Float32Array(256).map((_, i) => 0.5 + 0.4 * Math.cos((2 * Math.PI * i) / 16));
    const t = finalTable(256, 0, 256, 64, axis('bandlimit', 4));
    const plain = new Float32Array(64);
    resampleAxis(plain, 0, 1, wave, 0, 1, 1, { ...t, lobe: undefined }, 0, 64);
    const clamped = shrink(wave, 'bandlimit');
    for (let o = 8; o < 56; o++) expect(clamped[o]).toBe(plain[o]);
    // Samples at 4o + 1.5 see the crests at +-33.75 degrees: 0.8 cos(33.75 deg) = 0.665 peak to peak.
    expect(Math.max(...plain.subarray(8, 56)) - Math.min(...plain.subarray(8, 56))).toBeGreaterThan(0.6);
  });

  it('clamps lane by lane to the range of the lobe inputs, widened by RING_SLACK of its span', () => {
    const src = Float32Array.from([0, 1, 5, 2, 9, 9]); // two lanes: (0,1) (5,2) (9,9)
    const dst = Float32Array.from([-1, 3, 2, 1.5]);
    limitRinging(dst, 0, 2, src, 0, 2, 2, Int32Array.from([0, 2]), 0, 1);
    // Lane 0: lobe 0..5, span 5 -> [0 - min(0.15, 0), 5.15]; lane 1: 1..2 -> [0.97, 2.03].
    expect(dst[0]).toBe(0);
    expect(dst[1]).toBeCloseTo(2 + RING_SLACK, 6);
    // A flat lobe clamps exactly: no halo on the far side of an edge.
    const flat = Float32Array.from([0.02, 0.02, 0.02]);
    const out = Float32Array.from([-0.01]);
    limitRinging(out, 0, 1, flat, 0, 1, 1, Int32Array.from([0, 3]), 0, 1);
    expect(out[0]).toBeCloseTo(0.02, 7);
    const lobes = centralLobes({ srcLen: 6, dstLen: 1, taps: 6, start: Int32Array.from([0]), weights: Float32Array.from([-0.1, 0.2, 0.5, 0.4, -0.05, 0.05]), centre: Float64Array.from([2.5]) });
    expect(Array.from(lobes)).toEqual([1, 3]);
  });
  it('gives a crest or trough inside the lobe RING_CREST of the span, an edge plateau RING_SLACK', () => {
    const one = (src: number[], v: number) => {
      const out = Float32Array.from([v]);
      limitRinging(out, 0, 1, Float32Array.from(src), 0, 1, 1, Int32Array.from([0, src.length]), 0, 1);
      return out[0];
    };
    // A crest between samples (both ends lower): 1.0 + 0.08 * 0.8.
    expect(one([0.2, 0.9, 1.0, 0.9, 0.3], 1.2)).toBeCloseTo(1 + RING_CREST * 0.8, 6);
    // An edge: the last sample sits on the upper plateau, so 1.0 + 0.03 * 0.8.
    expect(one([0.2, 0.5, 1.0, 1.0, 1.0], 1.2)).toBeCloseTo(1 + RING_SLACK * 0.8, 6);
    // A trough inside the lobe: 0.4 - min(0.08 * 0.6, 0.25 * 0.4).
    expect(one([1, 0.5, 0.4, 0.5, 1], 0)).toBeCloseTo(0.4 - Math.min(RING_CREST * 0.6, RING_FLOOR * 0.4), 6);
    // A dark ground between two light lines: at most a quarter of its own light darker.
    expect(one([1, 0.02, 0.02, 0.02, 1], 0)).toBeCloseTo(0.02 * (1 - RING_FLOOR), 6);
  });
});
