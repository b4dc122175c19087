import type { Kernel } from '../kernels/index.js';
import type { AxisFilter } from './filter.js';
import { pyramidChainResponse } from './pyramid.js';

/** Frequency samples per cycle-per-output-pixel in the design integrals. */
const F_STEPS = 512;
/** Spatial samples of the designed filter per output pixel. */
const X_STEPS = 64;

/**
 * The final filter that follows `levels` pyramid reductions, on the last level's grid (x in
 * level pixels), designed in the frequency domain so that the whole chain
 *   pyramid(f) * final(f) = kernel stretched by scale (f) * exp(-2 pi^2 sigma^2 f^2)
 * for f up to twice the new Nyquist frequency (f in cycles per source pixel; beyond that the
 * designed kernel is below -60 dB). The pyramid's droop (cos^4 per level, Burt & Adelson 1983)
 * is thus compensated and the passband stays flat. The target response is the cosine
 * transform of the stretched kernel (midpoint rule); the filter is its inverse transform
 * divided by the pyramid response, over a support half an output pixel wider than the kernel's,
 * tabulated and read by linear interpolation. Half an output pixel of extra support keeps the
 * chain within 6e-4 of the direct response at every frequency (measured at 5x and 8x).
 */
export function compensatedFilter(kernel: Kernel, scale: number, sigma: number, levels: number): AxisFilter {
  let designs = designed.get(kernel);
  if (!designs) designed.set(kernel, (designs = new Map()));
  const key = `${scale}|${sigma}|${levels}`;
  let filter = designs.get(key);
  if (!filter) {
    filter = design(kernel, scale, sigma, levels);
    designs.set(key, filter);
    if (designs.size > DESIGNS_KEPT) designs.delete(designs.keys().next().value!);
  }
  return filter;
}

/**
 * Designs kept per kernel. A design depends on (kernel, scale, sigma, levels) only, not on the
 * image's size or crop: the x and y tables of a plan that keeps the aspect share one, and so
 * do the render's tables and the decision's sampled response in one thread (a design is
 * about 200 000 cosines, now turned rather than taken: under a millisecond once compiled).
 */
const DESIGNS_KEPT = 32;
const designed = new WeakMap<Kernel, Map<string, AxisFilter>>();

/** compensatedFilter's design itself (not cached). */
function design(kernel: Kernel, scale: number, sigma: number, levels: number): AxisFilter {
  const unit = 2 ** levels;
  const reach = kernel.support * scale;
  const fMax = 1 / scale;
  const df = fMax / F_STEPS;
  const dx = scale / X_STEPS;
  const kx = Math.ceil(reach / dx);
  // The kernel's samples do not depend on f: taken once, not once per frequency. The cosine
  // is even, so the two sides of each |j| are summed first; each sum's cosines come by turns.
  const w = new Float64Array(kx + 1);
  w[0] = kernel.weight(0);
  for (let j = 1; j <= kx; j++) w[j] = kernel.weight((j * dx) / scale) + kernel.weight((-j * dx) / scale);
  const gain = new Float64Array(F_STEPS);
  for (let i = 0; i < F_STEPS; i++) {
    const f = (i + 0.5) * df;
    const t = cosineSum(w, 0, 2 * Math.PI * f * dx);
    gain[i] = (t * Math.exp(-2 * Math.PI ** 2 * sigma * sigma * f * f)) / pyramidChainResponse(f, levels);
  }
  const support = reach + 0.5 * scale;
  const n = Math.ceil(support / dx);
  const table = new Float64Array(n + 2);
  // sum_i gain[i] cos(2 pi (i + 1/2) df j dx) = sum_i gain[i] cos(p / 2 + i p), p = 2 pi df j dx.
  for (let j = 0; j <= n; j++) {
    const p = 2 * Math.PI * df * j * dx;
    table[j] = cosineSum(gain, p / 2, p);
  }
  const levelDx = dx / unit;
  return {
    support: support / unit,
    at(x: number): number {
      const u = Math.abs(x) / levelDx;
      if (!(u < n)) return 0;
      const i = Math.floor(u);
      const t = u - i;
      return table[i] * (1 - t) + table[i + 1] * t;
    },
  };
}

/** Re-seeded from Math.cos and Math.sin every TURN_SEED steps, so the turns' rounding never builds up. */
const TURN_SEED = 64;

/**
 * sum_m a[m] cos(b + m t), the cosines made by turning (cos, sin) by t each step (angle
 * addition: four products a step, where Math.cos costs tens of nanoseconds) from exact values
 * every TURN_SEED steps: within 1e-13 of the sum of Math.cos terms (test/core/resample/compensate.test.ts).
 */
export function cosineSum(a: Float64Array, b: number, t: number): number {
  const ct = Math.cos(t);
  const st = Math.sin(t);
  let sum = 0;
  for (let m0 = 0; m0 < a.length; m0 += TURN_SEED) {
    let c = Math.cos(b + m0 * t);
    let s = Math.sin(b + m0 * t);
    const end = Math.min(a.length, m0 + TURN_SEED);
    for (let m = m0; m < end; m++) {
      sum += a[m] * c;
      const c2 = c * ct - s * st;
      s = c * st + s * ct;
      c = c2;
    }
  }
  return sum;
}
