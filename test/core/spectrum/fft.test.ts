import { describe, expect, it } from 'vitest';
import FFT from 'fft.js';
import { fftPlan, fftInPlace } from '../../../src/core/spectrum/fft.js';
import { fft2d, fft2dBitReversed } from '../../../src/core/spectrum/fft2d.js';
import { directDft, signal, type SignalKind } from './signals.js';

const kinds: SignalKind[] = ['impulse', 'ramp', 'sine', 'noise'];

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('fftInPlace', () => {
  // The DFT definition X[k] = sum x[n] e^{-2 pi i k n / N} is the reference (any DSP text).
  describe.each([1, 2, 4, 8, 16, 64])('size %i against the DFT definition', (n) => {
    it.each(kinds)('%s', (kind) => {
      const { re, im } = signal(kind, n, n);
      const ref = directDft(re, im);
      fftInPlace(fftPlan(n), re, im, 0);
      expect(maxAbsDiff(re, ref.re)).toBeLessThan(1e-9 * n);
      expect(maxAbsDiff(im, ref.im)).toBeLessThan(1e-9 * n);
    });
  });

  // Reference library: the npm package fft.js (radix-4, independent code), CHECKS.md.
  describe.each([2, 4, 32, 256, 1024, 4096])('size %i against fft.js', (n) => {
    it.each(kinds)('%s', (kind) => {
      const { re, im } = signal(kind, n, 7 * n);
      const ref = new FFT(n);
      const input = ref.createComplexArray();
      for (let i = 0; i < n; i++) {
        input[2 * i] = re[i];
        input[2 * i + 1] = im[i];
      }
      const out = ref.createComplexArray();
      ref.transform(out, input);
      fftInPlace(fftPlan(n), re, im, 0);
      const tol = 1e-10 * n;
      for (let k = 0; k < n; k++) {
        expect(Math.abs(re[k] - out[2 * k])).toBeLessThan(tol);
        expect(Math.abs(im[k] - out[2 * k + 1])).toBeLessThan(tol);
      }
    });
  });

  // Parseval: sum |x|^2 = (1/N) sum |X|^2 exactly for the DFT (CHECKS.md).
  it.each([8, 128, 2048])('keeps Parseval at size %i', (n) => {
    const { re, im } = signal('noise', n, 3);
    let timeEnergy = 0;
    for (let i = 0; i < n; i++) timeEnergy += re[i] * re[i] + im[i] * im[i];
    fftInPlace(fftPlan(n), re, im, 0);
    let freqEnergy = 0;
    for (let k = 0; k < n; k++) freqEnergy += re[k] * re[k] + im[k] * im[k];
    expect(freqEnergy / n).toBeCloseTo(timeEnergy, 9);
  });

  it('transforms a block at an offset without touching its neighbours', () => {
    const n = 16;
    const { re, im } = signal('noise', n, 11);
    const wideRe = new Float64Array(3 * n).fill(9);
    const wideIm = new Float64Array(3 * n).fill(9);
    wideRe.set(re, n);
    wideIm.set(im, n);
    const ref = directDft(re, im);
    fftInPlace(fftPlan(n), wideRe, wideIm, n);
    for (let k = 0; k < n; k++) {
      expect(wideRe[n + k]).toBeCloseTo(ref.re[k], 10);
      expect(wideIm[n + k]).toBeCloseTo(ref.im[k], 10);
      expect(wideRe[k]).toBe(9);
      expect(wideIm[2 * n + k]).toBe(9);
    }
  });

  it('rejects sizes that are not powers of two', () => {
    expect(() => fftPlan(12)).toThrow(RangeError);
    expect(() => fftPlan(0)).toThrow(RangeError);
    expect(() => fftPlan(Number.NaN)).toThrow(RangeError);
    expect(fftPlan(64)).toBe(fftPlan(64));
  });
});

describe('fft2d', () => {
  // 2-D DFT definition: X[u,v] = sum_x sum_y f[y,x] e^{-2 pi i (u x + v y)/N}.
  it.each([4, 16])('matches the 2-D DFT definition at %i x %i', (n) => {
    const { re, im } = signal('noise', n * n, 5);
    const refRe = new Float64Array(n * n);
    const refIm = new Float64Array(n * n);
    for (let v = 0; v < n; v++) {
      for (let u = 0; u < n; u++) {
        let sr = 0;
        let si = 0;
        for (let y = 0; y < n; y++) {
          for (let x = 0; x < n; x++) {
            const t = (-2 * Math.PI * ((u * x + v * y) % n)) / n;
            const i = y * n + x;
            sr += re[i] * Math.cos(t) - im[i] * Math.sin(t);
            si += re[i] * Math.sin(t) + im[i] * Math.cos(t);
          }
        }
        refRe[v * n + u] = sr;
        refIm[v * n + u] = si;
      }
    }
    fft2d(fftPlan(n), re, im);
    expect(maxAbsDiff(re, refRe)).toBeLessThan(1e-9 * n * n);
    expect(maxAbsDiff(im, refIm)).toBeLessThan(1e-9 * n * n);
  });

  it('puts a 2-D grating at its frequency bin', () => {
    const n = 32;
    const re = new Float64Array(n * n);
    const im = new Float64Array(n * n);
    // cos(2 pi (3 x + 5 y) / N) has all its energy at (u, v) = (3, 5) and (N-3, N-5).
    for (let y = 0; y < n; y++) {
      for (let x = 0; x < n; x++) re[y * n + x] = Math.cos((2 * Math.PI * (3 * x + 5 * y)) / n);
    }
    fft2d(fftPlan(n), re, im);
    expect(re[5 * n + 3]).toBeCloseTo((n * n) / 2, 8);
    expect(re[(n - 5) * n + (n - 3)]).toBeCloseTo((n * n) / 2, 8);
    let rest = 0;
    for (let i = 0; i < n * n; i++) {
      if (i !== 5 * n + 3 && i !== (n - 5) * n + n - 3) rest += re[i] ** 2 + im[i] ** 2;
    }
    expect(rest).toBeLessThan(1e-12);
  });

  it('gives the same values from a bit-reversed input without the permutation passes', () => {
    const n = 32;
    const plan = fftPlan(n);
    const { re, im } = signal('noise', n * n, 7);
    const pr = new Float64Array(n * n);
    const pi = new Float64Array(n * n);
    for (let y = 0; y < n; y++) {
      for (let x = 0; x < n; x++) {
        pr[plan.rev[y] * n + plan.rev[x]] = re[y * n + x];
        pi[plan.rev[y] * n + plan.rev[x]] = im[y * n + x];
      }
    }
    fft2d(plan, re, im);
    fft2dBitReversed(plan, pr, pi);
    expect(maxAbsDiff(pr, re)).toBe(0);
    expect(maxAbsDiff(pi, im)).toBe(0);
    expect(Math.max(...re.map(Math.abs))).toBeGreaterThan(1);
  });
});
