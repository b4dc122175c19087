import type { AxisFilter } from './filter.js';
import { buildWeights, type WeightTable } from './weights.js';

/**
 * Burt & Adelson (1983), "The Laplacian pyramid as a compact image code", IEEE Trans. Comm.
 * 31(4): the 5-tap generating kernel [1/4 - a/2, 1/4, a, 1/4, 1/4 - a/2]; a = 0.375 gives
 * [1, 4, 6, 4, 1] / 16, the binomial whose response is cos^4(pi f) (CHECKS.md).
 */
const PYRAMID_A = 0.375;
const TAPS = [0.25 - PYRAMID_A / 2, 0.25, PYRAMID_A, 0.25, 0.25 - PYRAMID_A / 2];

/** Frequency response W(f) = a + cos(2 pi f) / 2 + (1/2 - a) cos(4 pi f), f in cycles per input pixel. */
export function pyramidResponse(f: number): number {
  return PYRAMID_A + Math.cos(2 * Math.PI * f) / 2 + (0.5 - PYRAMID_A) * Math.cos(4 * Math.PI * f);
}

/** Response of `levels` reductions in a row, f in cycles per pixel of the first input. */
export function pyramidChainResponse(f: number, levels: number): number {
  let r = 1;
  for (let l = 0; l < levels; l++) r *= pyramidResponse(f * 2 ** l);
  return r;
}

const generating: AxisFilter = {
  support: 2,
  // Evaluated at integer offsets only: level pixel i sits exactly on input pixel 2i.
  at: (x) => (Math.abs(x) <= 2 ? TAPS[Math.round(x) + 2] : 0),
};

const identity: AxisFilter = { support: 0.5, at: (x) => (x === 0 ? 1 : 0) };

const cache = new Map<string, WeightTable>();

/**
 * One reduce-by-2 step along an axis of `n` pixels: ceil(n / 2) outputs, output i centred on
 * input 2i, mirrored edges (as every table, see weights.ts). With `reduce` false the axis is
 * copied unchanged (a level that reduces the other axis only). Cached by (n, reduce).
 */
export function reduceTable(n: number, reduce: boolean): WeightTable {
  const key = `${n}|${reduce}`;
  let t = cache.get(key);
  if (!t) {
    t = reduce
      ? { ...buildWeights(n, Math.ceil(n / 2), 0, 2, generating), symmetric5: [TAPS[2], TAPS[1], TAPS[0]] as const }
      : buildWeights(n, n, 0, 1, identity);
    if (cache.size > 64) cache.clear();
    cache.set(key, t);
  }
  return t;
}
