import type { SrgbQuantiser } from './encoder.js';

/**
 * The 8-bit quantiser's tables keyed by the bits of a float32, for the SIMD quantiser
 * (assembly/resample.ts, quantise8). A positive float32's bit pattern read as an integer grows
 * with its value, and its top bits (exponent and the first mantissa bits) cut every octave into
 * 2^(23 - SHIFT) equal buckets (IEEE 754 binary32 layout). The sRGB curve is close to a power
 * law, so buckets of equal relative width fit it: each holds at most one rounding threshold
 * (checked when built), and a code is one table read plus one comparison, with no float to
 * integer conversion. Same thresholds as srgbQuantiser8, rounded up to float32, so a float32
 * compares against them exactly as against the float64 ones: same codes as quantiseRun.
 */
export interface BitBuckets {
  /** Bits dropped from a float32's pattern to make its bucket number. */
  readonly shift: number;
  /** Bucket number of the smallest bucketed value; anything smaller falls in bucket 0. */
  readonly base: number;
  /** Code of each bucket's smallest value. */
  readonly start: Uint8Array;
  /** thresholds[k]: smallest float32 that rounds to code k + 1 (the last is +Infinity). */
  readonly thresholds: Float32Array;
}

/** 256 buckets per octave (IEEE 754 binary32: 23 mantissa bits, 8 kept). */
const SHIFT = 15;
/** Values below 2^-16 share bucket 0: they all round to code 0 (the first threshold is ~1.5e-4). */
const LOWEST = 2 ** -16;

const bits = new Int32Array(1);
const float = new Float32Array(bits.buffer);

function patternOf(v: number): number {
  float[0] = v;
  return bits[0];
}

function valueOf(pattern: number): number {
  bits[0] = pattern;
  return float[0];
}

/** Smallest float32 >= x (x finite and positive). */
function roundUp32(x: number): number {
  const f = Math.fround(x);
  return f >= x ? f : valueOf(patternOf(f) + 1);
}

const cached = new WeakMap<SrgbQuantiser, BitBuckets>();

/** The bucket tables of the 8-bit quantiser `q` (built on first use, once per quantiser). */
export function bitBuckets8(q: SrgbQuantiser): BitBuckets {
  const known = cached.get(q);
  if (known) return known;
  const thresholds = Float32Array.from(q.thresholds, (t) => (t === Infinity ? t : roundUp32(t)));
  const base = patternOf(LOWEST) >> SHIFT;
  const count = (patternOf(1) >> SHIFT) - base;
  const start = new Uint8Array(count);
  for (let b = 0; b < count; b++) {
    const lo = b === 0 ? 0 : valueOf((b + base) << SHIFT);
    const hi = valueOf((b + base + 1) << SHIFT);
    let code = 0;
    while (lo >= thresholds[code]) code++;
    if (hi > thresholds[code] && hi > thresholds[code + 1]) throw new Error('sRGB bit buckets too coarse');
    start[b] = code;
  }
  const buckets = { shift: SHIFT, base, start, thresholds };
  cached.set(q, buckets);
  return buckets;
}
