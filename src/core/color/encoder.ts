import { srgbDecode } from './srgb.js';

/**
 * Fast, exact linear -> sRGB code quantiser for hot loops.
 *
 * Contract: `encode(v)` returns the same code as round(encode_sRGB(clamp(v)) * max) for every
 * finite v, where the rounding boundary of code k is the linear value decode((k + 0.5) / max)
 * (the curve is monotonic, IEC 61966-2-1). A coarse bucket table gives a starting code, and
 * at most a few threshold comparisons finish it. Pure; allocates only when built.
 */
export interface SrgbQuantiser {
  readonly max: number;
  /** thresholds[k]: smallest linear value that rounds to code k + 1 (thresholds[max] = Infinity). */
  readonly thresholds: Float64Array;
  /** start[b]: the code of linear value b / buckets. */
  readonly start: Int32Array;
  readonly buckets: number;
  encode(v: number): number;
}

function buildQuantiser(max: number, bucketsPerLevel: number): SrgbQuantiser {
  // thresholds[k] = smallest linear value that rounds to code k + 1.
  const thresholds = new Float64Array(max + 1);
  for (let k = 0; k < max; k++) thresholds[k] = srgbDecode((k + 0.5) / max);
  thresholds[max] = Infinity;
  // The curve's slope is at most 12.92 (its linear toe), so a bucket spans at most
  // 12.92 / bucketsPerLevel codes and the finishing loop runs a few steps at most.
  const buckets = max * bucketsPerLevel;
  const start = new Int32Array(buckets + 1);
  let code = 0;
  for (let b = 0; b <= buckets; b++) {
    const v = b / buckets;
    while (v >= thresholds[code]) code++;
    start[b] = code;
  }
  return {
    max,
    thresholds,
    start,
    buckets,
    encode(v: number): number {
      if (!(v > 0)) return 0;
      if (v >= 1) return max;
      let code = start[(v * buckets) | 0];
      while (v >= thresholds[code]) code++;
      return code;
    },
  };
}

let q8: SrgbQuantiser | undefined;
let q16: SrgbQuantiser | undefined;

/** The shared 8-bit quantiser (built on first use). */
export function srgbQuantiser8(): SrgbQuantiser {
  return (q8 ??= buildQuantiser(255, 16));
}

/** The shared 16-bit quantiser (built on first use). */
export function srgbQuantiser16(): SrgbQuantiser {
  return (q16 ??= buildQuantiser(65535, 4));
}

/**
 * Quantises n working values src[srcAt...] to codes out[outAt...] with q, the same result as
 * q.encode on each, with the tables in locals (the loop of every opaque output row).
 * Not in place (float in, integer out); allocates nothing.
 */
export function quantiseRun(
  q: SrgbQuantiser,
  src: Float32Array,
  srcAt: number,
  n: number,
  out: Uint8Array | Uint16Array,
  outAt: number,
): void {
  const { thresholds, start, buckets, max } = q;
  for (let i = 0; i < n; i++) {
    const v = src[srcAt + i];
    let code: number;
    if (!(v > 0)) code = 0;
    else if (v >= 1) code = max;
    else {
      code = start[(v * buckets) | 0];
      while (v >= thresholds[code]) code++;
    }
    out[outAt + i] = code;
  }
}
