import { describe, expect, it } from 'vitest';
import { srgbToLinear8, srgbToLinear16, linearToSrgb8, linearToSrgb16 } from '../../../src/core/index.js';
import { srgbQuantiser8, srgbQuantiser16, srgbEncode, quantiseRun } from '../../../src/core/color/index.js';

describe('sRGB transfer function', () => {
  // IEC 61966-2-1:1999 check values, as listed in CHECKS.md.
  const decoded: Array<[number, number]> = [
    [0, 0], [1, 0.000303527], [10, 0.00303527], [11, 0.00334654], [50, 0.031896],
    [118, 0.181164], [128, 0.215861], [188, 0.502886], [200, 0.57758], [255, 1],
  ];
  it.each(decoded)('8-bit code %i decodes to %f (IEC 61966-2-1)', (code, lin) => {
    expect(srgbToLinear8[code]).toBeCloseTo(lin, 6);
  });

  // IEC 61966-2-1 encode; 0.5 -> 187.516, 0.25 -> 136.96, 0.18 -> 117.65 (CHECKS.md).
  it.each([[0.5, 188, 187.516], [0.25, 137, 136.96], [0.18, 118, 117.65]])(
    'linear %f encodes to code %i (%f before rounding)', (lin, code, exact) => {
      expect(srgbEncode(lin) * 255).toBeCloseTo(exact, 2);
      expect(linearToSrgb8(lin)).toBe(code);
    });

  it('16-bit table agrees with the 8-bit one where the codes coincide (code * 257)', () => {
    for (let c = 0; c < 256; c++) expect(srgbToLinear16[c * 257]).toBeCloseTo(srgbToLinear8[c], 6);
  });

  it('encode(decode(code)) gives every code back, 8 and 16 bit', () => {
    for (let c = 0; c < 256; c++) expect(linearToSrgb8(srgbToLinear8[c])).toBe(c);
    for (let c = 0; c < 65536; c++) if (linearToSrgb16(srgbToLinear16[c]) !== c) expect(c).toBe(-1);
  });

  it('clamps overshoot and NaN', () => {
    expect(linearToSrgb8(-0.2)).toBe(0);
    expect(linearToSrgb8(1.3)).toBe(255);
    expect(linearToSrgb8(Number.NaN)).toBe(0);
    expect(linearToSrgb16(2)).toBe(65535);
  });

  it('the fast quantisers round exactly like the formula (seeded random values)', () => {
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
    const q8 = srgbQuantiser8();
    const q16 = srgbQuantiser16();
    const values = Float32Array.from({ length: 200000 }, () => rnd() * 1.2 - 0.1);
    const run8 = new Uint8Array(values.length);
    const run16 = new Uint16Array(values.length);
    quantiseRun(q8, values, 0, values.length, run8, 0);
    quantiseRun(q16, values, 0, values.length, run16, 0);
    values.forEach((v, i) => {
      const a = q8.encode(v), b = linearToSrgb8(v);
      const c = q16.encode(v), d = linearToSrgb16(v);
      if (a !== b || c !== d || run8[i] !== b || run16[i] !== d) expect([v, a, c, run8[i], run16[i]]).toEqual([v, b, d, b, d]);
    });
  });
});
