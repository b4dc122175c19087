import { afterAll, describe, expect, it } from 'vitest';
import { makePlan, renderRaster } from '../../../src/core/index.js';
import { setSimdEnabled, simdKernels } from '../../../src/core/simd/index.js';
import type { Channels, PixelRaster } from '../../../src/core/types.js';
import { naturalField } from '../reference/natural.js';
import { planTable, streamLayout } from '../../../src/core/resample/index.js';

/** The natural-looking field re-packed to 1..4 channels, 8 or 16 bits, with a varying alpha. */
function packed(channels: Channels, deep: boolean): PixelRaster {
  const rgb = naturalField(300, 220, 5).data;
  const n = 300 * 220;
  const data = deep ? new Uint16Array(n * channels) : new Uint8Array(n * channels);
  const k = deep ? 257 : 1;
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < channels; c++) {
      const alpha = channels === 2 || channels === 4 ? c === channels - 1 : false;
      data[i * channels + c] = (alpha ? (i * 7) % 256 : rgb[i * 3 + (c % 3)]) * k;
    }
  }
  return { data, width: 300, height: 220, channels };
}

afterAll(() => setSimdEnabled(true));

/**
 * Renders `plan` with the scalar loops (the reference) and with SIMD, and checks the SIMD codes
 * within 1 of the reference, mean difference < 0.01. float32 accumulation (SIMD) against double
 * accumulation (scalar): the sums differ in the last float32 bits, which moves a code only where
 * it sits on a rounding boundary.
 */
function expectNearScalar(src: PixelRaster, plan: ReturnType<typeof makePlan>): void {
  setSimdEnabled(false);
  const ref = renderRaster(src, plan).data;
  setSimdEnabled(true);
  const got = renderRaster(src, plan).data;
  let worst = 0, sum = 0;
  for (let i = 0; i < ref.length; i++) {
    const d = Math.abs(ref[i] - got[i]);
    worst = Math.max(worst, d);
    sum += d;
  }
  expect(worst).toBeLessThanOrEqual(1);
  expect(sum / ref.length).toBeLessThan(0.01);
}

describe('SIMD kernels against the scalar loops (the reference)', () => {
  it('are available on this engine (Node 20 has WebAssembly SIMD)', () => {
    expect(typeof simdKernels()?.across).toBe('function');
  });

  const cases: Array<[Channels, boolean, number, number, string]> = [
    [1, false, 37, 27, 'auto'], [2, true, 150, 110, 'auto'], [3, false, 41, 30, 'auto'],
    [4, false, 97, 70, 'lanczos-3'], [3, true, 640, 480, 'auto'], [4, true, 20, 15, 'auto'],
  ];
  it.each(cases)('%i channels, 16-bit %s, to %ix%i with %s: within 1 code, mean < 0.01', (ch, deep, w, h, kernel) => {
    const src = packed(ch, deep);
    for (const light of ['linear', 'encoded'] as const) {
      const plan = makePlan({ sourceWidth: 300, sourceHeight: 220, targetWidth: w, targetHeight: h, kernel, prefilter: 'auto', light });
      expectNearScalar(src, plan);
    }
  });

  // The y pass sums eight taps per sweep of a row, then four, then one; rows of 903 floats end
  // in a scalar tail, and rows of 903 codes take decode8's scalar tail after its 4-code loads.
  it('rows of odd length through long tables (8-tap sweeps, scalar tails): within 1 code, mean < 0.01', () => {
    const src = naturalField(301, 223, 9);
    const plan = makePlan({ sourceWidth: 301, sourceHeight: 223, targetWidth: 67, targetHeight: 50, kernel: 'auto', prefilter: 'auto', light: 'linear' });
    const ty = planTable(plan, 'y');
    expect(plan.y.pyramidLevels).toBe(0);
    expect(ty.taps).toBeGreaterThanOrEqual(17);
    expect(streamLayout(301, 3, planTable(plan, 'x'), ty, 0, 50, true).hFirst).toBe(false);
    expectNearScalar(src, plan);
  });
});
