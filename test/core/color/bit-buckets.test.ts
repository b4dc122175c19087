import { describe, expect, it } from 'vitest';
import { quantiseRun, srgbQuantiser8 } from '../../../src/core/color/index.js';
import { bitBuckets8 } from '../../../src/core/color/bit-buckets.js';
import { arenaFor, simdKernels } from '../../../src/core/simd/index.js';

/** Float32 values on both sides of every rounding threshold, plus seeded random ones and edge cases. */
function probeValues(): Float32Array {
  const q = srgbQuantiser8();
  const bits = new Int32Array(1);
  const f = new Float32Array(bits.buffer);
  const out: number[] = [0, -0, -1e-30, 1e-45, 2 ** -16, 1, 1.5, -2, Number.NaN, Infinity, -Infinity, 0.99999994];
  for (let k = 0; k < 255; k++) {
    f[0] = q.thresholds[k];
    const at = bits[0];
    for (let d = -3; d <= 3; d++) {
      bits[0] = at + d;
      out.push(f[0]);
    }
  }
  let seed = 99;
  const rnd = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
  for (let i = 0; i < 50000; i++) out.push(rnd() * 1.1 - 0.05, rnd() ** 6);
  return Float32Array.from(out);
}

describe('bit-bucket tables of the 8-bit sRGB quantiser', () => {
  it('each bucket starts at or below its values\' codes, one threshold at most above (checked when built)', () => {
    const b = bitBuckets8(srgbQuantiser8());
    expect(b.thresholds[255]).toBe(Infinity);
    for (let k = 1; k < 255; k++) expect(b.thresholds[k]).toBeGreaterThan(b.thresholds[k - 1]);
    for (let i = 1; i < b.start.length; i++) expect(b.start[i] - b.start[i - 1]).toBeLessThanOrEqual(1);
  });

  it('the SIMD quantiser gives the scalar reference\'s codes (quantiseRun) around every threshold', () => {
    const k = simdKernels();
    expect(k).not.toBeNull();
    const values = probeValues();
    const ref = new Uint8Array(values.length);
    quantiseRun(srgbQuantiser8(), values, 0, values.length, ref, 0);
    const b = bitBuckets8(srgbQuantiser8());
    const arena = arenaFor(k!, values.length * 6 + 8192);
    const src = arena.floats(values.length);
    src.set(values);
    const thresholds = arena.scratch(1024);
    new Float32Array(k!.memory.buffer, thresholds, 256).set(b.thresholds);
    const start = arena.scratch(b.start.length);
    new Uint8Array(k!.memory.buffer, start, b.start.length).set(b.start);
    const dst = arena.scratch(values.length);
    k!.quantise8(dst, src.byteOffset, values.length, thresholds, start, b.shift, b.base);
    const got = new Uint8Array(k!.memory.buffer, dst, values.length);
    let mismatches = 0;
    for (let i = 0; i < values.length; i++) if (got[i] !== ref[i]) mismatches++;
    expect(mismatches).toBe(0);
  });
});
