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
  if (lanes > 4) return across(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, table, o0, o1);
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

/** Many lanes (whole rows): accumulate row by row so the inner loop runs over contiguous memory. */
function across(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const { taps, start, weights } = table;
  for (let o = o0; o < o1; o++) {
    const d = dstBase + o * dstStep;
    const dEnd = d + lanes;
    const row = o * taps;
    let s = srcBase + start[o] * srcStep;
    let w = weights[row];
    for (let i = d, j = s; i < dEnd; i++, j++) dst[i] = w * src[j];
    for (let k = 1; k < taps; k++) {
      s += srcStep;
      w = weights[row + k];
      if (w === 0) continue;
      for (let i = d, j = s; i < dEnd; i++, j++) dst[i] += w * src[j];
    }
  }
}
