import { sinc, type Kernel } from './kernel.js';

/**
 * Lanczos kernel L(x) = sinc(x) sinc(x / a) for |x| < a; Duchon, C. E. (1979), "Lanczos
 * filtering in one and two dimensions", J. Applied Meteorology 18(8). Interpolating.
 */
export function lanczos(a: number): Kernel {
  return {
    name: `lanczos-${a}`,
    support: a,
    interpolating: true,
    stretch: true,
    source: `Lanczos a=${a} (Duchon 1979)`,
    weight: (x) => (Math.abs(x) < a ? sinc(x) * sinc(x / a) : 0),
  };
}

/**
 * Zeroth-order modified Bessel function of the first kind, by its power series
 * sum ((x/2)^k / k!)^2 (Abramowitz & Stegun 9.6.12); converges for every x we use (< 30).
 */
export function besselI0(x: number): number {
  const h = (x * x) / 4;
  let term = 1;
  let sum = 1;
  for (let k = 1; k < 200 && term > sum * 1e-17; k++) {
    term *= h / (k * k);
    sum += term;
  }
  return sum;
}

/**
 * Kaiser window w(x) = I0(beta sqrt(1 - (x/r)^2)) / I0(beta) on |x| < r; Kaiser, J. F. (1974),
 * "Nonrecursive digital filter design using the I0-sinh window function", Proc. IEEE ISCAS.
 */
export function kaiserWindow(r: number, beta: number): (x: number) => number {
  const norm = 1 / besselI0(beta);
  return (x) => {
    const u = x / r;
    return u * u < 1 ? besselI0(beta * Math.sqrt(1 - u * u)) * norm : 0;
  };
}
