import { describe, expect, it } from 'vitest';
import { hannWindow } from '../../../src/core/spectrum/window.js';

describe('hannWindow (periodic)', () => {
  // Welch (1967) / CHECKS.md: periodic Hann has sum w = L/2 and sum w^2 = 3L/8.
  it.each([4, 8, 64, 128, 1000])('has sum L/2 and sum of squares 3L/8 at L = %i', (L) => {
    const w = hannWindow(L);
    let s = 0;
    let s2 = 0;
    for (const v of w) {
      s += v;
      s2 += v * v;
    }
    expect(s).toBeCloseTo(L / 2, 10);
    expect(s2).toBeCloseTo((3 * L) / 8, 10);
  });

  // CHECKS.md (Welch 1967): with 50 % overlap the periodic Hann window is constant-overlap-add.
  it('adds to a constant at 50 % overlap', () => {
    const L = 64;
    const w = hannWindow(L);
    for (let n = 0; n < L / 2; n++) expect(w[n] + w[n + L / 2]).toBeCloseTo(1, 12);
  });

  it('starts at zero, peaks at 1 in the middle and is cached', () => {
    const w = hannWindow(16);
    expect(w[0]).toBe(0);
    expect(w[8]).toBeCloseTo(1, 15);
    expect(hannWindow(16)).toBe(w);
    expect(() => hannWindow(0)).toThrow(RangeError);
  });
});
