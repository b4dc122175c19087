import type { Kernel } from '../kernels/index.js';

/** A continuous 1-D filter on a stage's pixel grid: zero for |x| >= support. */
export interface AxisFilter {
  readonly support: number;
  at(x: number): number;
}

/** Gaussian truncated at 4 sigma (the tail left out is exp(-8) = 3e-4 of the peak). */
const GAUSS_REACH = 4;
/** Tabulation points per unit of the narrower of (stretch, sigma): linear-interpolation error ~1e-5. */
const TABLE_DENSITY = 48;

/**
 * The kernel stretched by `stretch` (x measured in stage pixels), convolved with a Gaussian of
 * `sigma` stage pixels when sigma > 0. The convolution is tabulated once (midpoint rule) and
 * read by linear interpolation; without a Gaussian the kernel is evaluated exactly.
 * Gaussian frequency response exp(-2 pi^2 sigma^2 f^2) (CHECKS.md), so the fused filter's
 * response is the kernel's times that.
 */
export function stretchedFilter(kernel: Kernel, stretch: number, sigma: number): AxisFilter {
  const base = (x: number) => kernel.weight(x / stretch);
  const kernelReach = kernel.support * stretch;
  if (!(sigma > 0)) return { support: kernelReach, at: base };
  return convolveGaussian(base, kernelReach, sigma, Math.min(stretch, Math.max(sigma, 0.25)));
}

/** Tabulated (f * gaussian_sigma)(x), f supported on |x| < reach. */
export function convolveGaussian(
  f: (x: number) => number,
  reach: number,
  sigma: number,
  scale: number,
): AxisFilter {
  const h = scale / TABLE_DENSITY;
  const g = GAUSS_REACH * sigma;
  const support = reach + g;
  const n = Math.ceil(support / h);
  const gn = Math.ceil(g / h);
  const gw = new Float64Array(2 * gn + 1);
  const k = -1 / (2 * sigma * sigma);
  for (let i = -gn; i <= gn; i++) gw[i + gn] = Math.exp(k * (i * h) ** 2);
  const table = new Float64Array(2 * n + 3);
  for (let i = -n; i <= n; i++) {
    let acc = 0;
    for (let t = -gn; t <= gn; t++) acc += f((i - t) * h) * gw[t + gn];
    table[i + n] = acc;
  }
  return {
    support,
    at(x: number): number {
      const u = x / h + n;
      if (!(u >= 0 && u < 2 * n)) return 0;
      const i = Math.floor(u);
      const t = u - i;
      return table[i] * (1 - t) + table[i + 1] * t;
    },
  };
}
