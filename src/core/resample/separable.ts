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
  const { taps, start, weights } = table;
  if (lanes > 4) {
    for (let o = o0; o < o1; o++) {
      const d = dstBase + o * dstStep;
      const row = o * taps;
      let s = srcBase + start[o] * srcStep;
      let w = weights[row];
      for (let l = 0; l < lanes; l++) dst[d + l] = w * src[s + l];
      for (let k = 1; k < taps; k++) {
        s += srcStep;
        w = weights[row + k];
        if (w === 0) continue;
        for (let l = 0; l < lanes; l++) dst[d + l] += w * src[s + l];
      }
    }
    return;
  }
  for (let o = o0; o < o1; o++) {
    const row = o * taps;
    let s = srcBase + start[o] * srcStep;
    let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
    for (let k = 0; k < taps; k++, s += srcStep) {
      const w = weights[row + k];
      a0 += w * src[s];
      if (lanes > 1) a1 += w * src[s + 1];
      if (lanes > 2) a2 += w * src[s + 2];
      if (lanes > 3) a3 += w * src[s + 3];
    }
    const d = dstBase + o * dstStep;
    dst[d] = a0;
    if (lanes > 1) dst[d + 1] = a1;
    if (lanes > 2) dst[d + 2] = a2;
    if (lanes > 3) dst[d + 3] = a3;
  }
}
