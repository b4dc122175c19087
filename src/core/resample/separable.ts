import { limitPass } from './limit.js';
import type { WeightTable } from './weights.js';

/**
 * The one 1-D resampling routine, for rows, columns and channels alike, through strides.
 *
 *   dst[dstBase + o * dstStep + l] = sum_k table.weights[o * taps + k]
 *                                      * src[srcBase + (table.start[o] + k) * srcStep + l]
 * for outputs o in [o0, o1) and lanes l in [0, lanes).
 *
 * A row of interleaved pixels is lanes = channels, step = channels; a block of rows filtered
 * down its columns is lanes = row length, step = row length (the lane loop is then the
 * contiguous inner loop). Not in place: dst and src must be different arrays. Allocates nothing.
 * When the table was placed in the SIMD memory and both arrays live there too, the compiled
 * f32x4 twin of the loop runs (assembly/resample.ts); these scalar loops are its reference.
 * A table with central lobes (limit.ts) then has each output clamped to its lobe's range.
 */
export function resampleAxis(
  dst: Float32Array,
  dstBase: number,
  dstStep: number,
  src: Float32Array,
  srcBase: number,
  srcStep: number,
  lanes: number,
  table: WeightTable,
  o0: number,
  o1: number,
): void {
  if (dst === src) throw new RangeError('resampleAxis works out of place: dst === src');
  filterAxis(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
  if (table.lobe) limitPass(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
}

/** resampleAxis without the ringing limiter: the SIMD twin or the scalar loops. */
function filterAxis(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const k = table.simd;
  if (k && dst.buffer === k.memory.buffer && src.buffer === dst.buffer) {
    const d = dst.byteOffset, s = src.byteOffset;
    if (table.symmetric5) return simdReduce5(k, d, dstBase, dstStep, s, srcBase, srcStep, lanes, table, o0, o1);
    const pass = lanes > 4 ? k.across : k.pixels;
    return pass(d, dstBase, dstStep, s, srcBase, srcStep, lanes, table.taps, table.start.byteOffset, table.weights.byteOffset, o0, o1);
  }
  if (lanes > 4) return across(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
  if (table.symmetric5) return reduce5(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
  pixels(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
}

/** Pixels of 1..4 interleaved samples through any table. */
function pixels(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  // Pixels of 1..4 interleaved samples: one accumulator per lane, specialised so the inner
  // loop has no lane test (the JIT keeps the accumulators in registers).
  const { taps, start, weights } = table;
  for (let o = o0; o < o1; o++) {
    let r = o * taps;
    const end = r + taps;
    let s = srcBase + start[o] * srcStep;
    const d = dstBase + o * dstStep;
    if (lanes === 3) {
      let a0 = 0, a1 = 0, a2 = 0;
      for (; r < end; r++, s += srcStep) {
        const w = weights[r];
        a0 += w * src[s];
        a1 += w * src[s + 1];
        a2 += w * src[s + 2];
      }
      dst[d] = a0; dst[d + 1] = a1; dst[d + 2] = a2;
    } else if (lanes === 1) {
      let a0 = 0;
      for (; r < end; r++, s += srcStep) a0 += weights[r] * src[s];
      dst[d] = a0;
    } else if (lanes === 4) {
      let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
      for (; r < end; r++, s += srcStep) {
        const w = weights[r];
        a0 += w * src[s];
        a1 += w * src[s + 1];
        a2 += w * src[s + 2];
        a3 += w * src[s + 3];
      }
      dst[d] = a0; dst[d + 1] = a1; dst[d + 2] = a2; dst[d + 3] = a3;
    } else {
      let a0 = 0, a1 = 0;
      for (; r < end; r++, s += srcStep) {
        const w = weights[r];
        a0 += w * src[s];
        a1 += w * src[s + 1];
      }
      dst[d] = a0; dst[d + 1] = a1;
    }
  }
}

/**
 * Pixels through a table of symmetric 5-tap rows (the pyramid's reduce): interior rows use the
 * symmetry, a (x0) + b (x-1 + x1) + c (x-2 + x2), with the weights held in registers; rows at
 * the border go through the general loop.
 */
function reduce5(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const [a, b, c] = table.symmetric5!;
  const first = Math.min(o1, Math.max(o0, 1));
  const last = Math.max(first, Math.min(o1, (table.srcLen - 3) >> 1));
  if (o0 < first) pixels(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, first);
  const s1 = srcStep, s2 = 2 * srcStep, s3 = 3 * srcStep, s4 = 4 * srcStep;
  if (lanes === 3) {
    for (let o = first; o < last; o++) {
      const j = srcBase + (2 * o - 2) * srcStep;
      const d = dstBase + o * dstStep;
      dst[d] = a * src[j + s2] + b * (src[j + s1] + src[j + s3]) + c * (src[j] + src[j + s4]);
      dst[d + 1] = a * src[j + s2 + 1] + b * (src[j + s1 + 1] + src[j + s3 + 1]) + c * (src[j + 1] + src[j + s4 + 1]);
      dst[d + 2] = a * src[j + s2 + 2] + b * (src[j + s1 + 2] + src[j + s3 + 2]) + c * (src[j + 2] + src[j + s4 + 2]);
    }
  } else {
    for (let o = first; o < last; o++) {
      const s = srcBase + (2 * o - 2) * srcStep;
      const d = dstBase + o * dstStep;
      for (let l = 0; l < lanes; l++) {
        const j = s + l;
        dst[d + l] = a * src[j + s2] + b * (src[j + s1] + src[j + s3]) + c * (src[j] + src[j + s4]);
      }
    }
  }
  if (last < o1) pixels(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, last, o1);
}

/**
 * reduce5 through the SIMD kernels: interior rows by symmetry (pixels, or whole rows down
 * columns when lanes > 4), border rows through the general pass.
 */
function simdReduce5(
  k: NonNullable<WeightTable['simd']>, d: number, dstBase: number, dstStep: number, s: number,
  srcBase: number, srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const [a, b, c] = table.symmetric5!;
  const first = Math.min(o1, Math.max(o0, 1));
  const last = Math.max(first, Math.min(o1, (table.srcLen - 3) >> 1));
  const { taps } = table;
  const start = table.start.byteOffset;
  const weights = table.weights.byteOffset;
  const pass = lanes > 4 ? k.across : k.pixels;
  if (o0 < first) pass(d, dstBase, dstStep, s, srcBase, srcStep, lanes, taps, start, weights, o0, first);
  (lanes > 4 ? k.across5 : k.reduce5)(d, dstBase, dstStep, s, srcBase, srcStep, lanes, a, b, c, first, last);
  if (last < o1) pass(d, dstBase, dstStep, s, srcBase, srcStep, lanes, taps, start, weights, last, o1);
}

/**
 * Many lanes (whole rows): the inner loop runs over contiguous memory, four input rows per pass
 * so the output row is read and written once per four taps.
 */
function across(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const { taps, start, weights } = table;
  for (let o = o0; o < o1; o++) {
    const d = dstBase + o * dstStep;
    const dEnd = d + lanes;
    const row = o * taps;
    const s = srcBase + start[o] * srcStep;
    let k = 0;
    if (taps >= 4) {
      const w0 = weights[row], w1 = weights[row + 1], w2 = weights[row + 2], w3 = weights[row + 3];
      const s1 = srcStep, s2 = 2 * srcStep, s3 = 3 * srcStep;
      for (let i = d, j = s; i < dEnd; i++, j++) dst[i] = w0 * src[j] + w1 * src[j + s1] + w2 * src[j + s2] + w3 * src[j + s3];
      k = 4;
    } else {
      const w0 = weights[row];
      for (let i = d, j = s; i < dEnd; i++, j++) dst[i] = w0 * src[j];
      k = 1;
    }
    for (; k + 4 <= taps; k += 4) {
      const w0 = weights[row + k], w1 = weights[row + k + 1], w2 = weights[row + k + 2], w3 = weights[row + k + 3];
      const j0 = s + k * srcStep, s1 = srcStep, s2 = 2 * srcStep, s3 = 3 * srcStep;
      for (let i = d, j = j0; i < dEnd; i++, j++) dst[i] += w0 * src[j] + w1 * src[j + s1] + w2 * src[j + s2] + w3 * src[j + s3];
    }
    for (; k < taps; k++) {
      const w = weights[row + k];
      for (let i = d, j = s + k * srcStep; i < dEnd; i++, j++) dst[i] += w * src[j];
    }
  }
}
