/** Deterministic analytic test signals (no invented data): ramps, sines, impulses, noise. */
import { mulberry32 } from '../../../tools/demo/prng.js';

/** A seeded generator (mulberry32, tools/demo/prng.ts), so noise inputs are the same on every run. */
export const seededRandom = mulberry32;

export type SignalKind = 'impulse' | 'ramp' | 'sine' | 'noise';

/** A complex test signal of length n: real part from the kind, imaginary part noise or zero. */
export function signal(kind: SignalKind, n: number, seed = 1): { re: Float64Array; im: Float64Array } {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const rnd = seededRandom(seed);
  for (let i = 0; i < n; i++) {
    if (kind === 'impulse') re[i] = i === 1 % n ? 1 : 0;
    else if (kind === 'ramp') re[i] = i / n;
    else if (kind === 'sine') re[i] = Math.sin((2 * Math.PI * 3.3 * i) / n) + 0.25;
    else {
      re[i] = rnd() - 0.5;
      im[i] = rnd() - 0.5;
    }
  }
  return { re, im };
}

/** The DFT by its definition, O(N^2): X[k] = sum_n x[n] exp(-2 pi i k n / N). */
export function directDft(re: Float64Array, im: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = re.length;
  const outRe = new Float64Array(n);
  const outIm = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    for (let j = 0; j < n; j++) {
      const t = (-2 * Math.PI * ((k * j) % n)) / n;
      const c = Math.cos(t);
      const s = Math.sin(t);
      sr += re[j] * c - im[j] * s;
      si += re[j] * s + im[j] * c;
    }
    outRe[k] = sr;
    outIm[k] = si;
  }
  return { re: outRe, im: outIm };
}
