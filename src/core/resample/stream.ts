import { resampleAxis } from './separable.js';
import type { WeightTable } from './weights.js';

/** Rows of working floats, produced on demand (decoded source rows, or a stage's output). */
export interface RowSource {
  readonly width: number;
  readonly lanes: number;
  /** Writes row y (width * lanes floats) to out[at...]. Callers ask for rows in non-decreasing order. */
  read(y: number, out: Float32Array, at: number): void;
}

/** Spare window rows beyond the filter's taps: the live rows move to the front once per SLACK rows. */
const SLACK = 64;

/**
 * Buffer layout of a stream of output rows [o0, o1): which axis goes first (the cheaper order),
 * the window's row length and capacity in rows, and the float counts of its buffers
 * [window, line, mixed]. Cost counts multiply-adds: a horizontal tap costs one per sample in
 * the scalar loops but one f32x4 per pixel in the SIMD ones, where a vertical tap costs a
 * quarter per sample. The order is costed over all of ty's output rows, not the band: the two
 * orders round differently, and a band must give exactly the same rows as the whole.
 */
export function streamLayout(
  sourceWidth: number, lanes: number, tx: WeightTable | null, ty: WeightTable, o0: number, o1: number, simd: boolean,
) {
  const dstW = tx ? tx.dstLen : sourceWidth;
  const taps = tx ? tx.taps : 0;
  const rows = o1 > o0 ? ty.start[o1 - 1] + ty.taps - ty.start[o0] : 0;
  const outRows = ty.dstLen;
  const inRows = outRows > 0 ? ty.start[outRows - 1] + ty.taps - ty.start[0] : 0;
  // The ringing limiter clamps after each pass, so the two orders differ by more than rounding
  // there: with it, the order is the SIMD one whether or not SIMD runs (same bytes either way).
  const vector = simd || ty.lobe !== undefined || tx?.lobe !== undefined;
  const h = vector ? 1 : lanes;
  const v = vector ? lanes / 4 : lanes;
  const hFirstCost = inRows * dstW * taps * h + outRows * dstW * ty.taps * v;
  const vFirstCost = outRows * sourceWidth * ty.taps * v + outRows * dstW * taps * h;
  // With no x table (the source already has the output width) the rows go straight to the window.
  const hFirst = tx !== null && hFirstCost <= vFirstCost;
  const rowLen = (hFirst ? dstW : sourceWidth) * lanes;
  const capacity = Math.min(rows, ty.taps + Math.max(SLACK, ty.taps));
  const sizes = [capacity * rowLen, (hFirst ? sourceWidth : 1) * lanes, hFirst || !tx ? 0 : rowLen] as const;
  return { hFirst, rowLen, capacity, sizes };
}

/**
 * A separable resample of `source` through tables tx (columns; null when the source's rows
 * already have the output width) and ty (rows), itself a
 * RowSource of output rows [o0, o1), read in non-decreasing order. A sliding window holds only
 * the input rows the current output row needs plus some slack, so no full float copy of the
 * input ever exists and every input row is produced once. The cheaper axis order for all of
 * ty's rows is taken (whatever the band, so a band has the whole's bytes), which is the
 * more-shrinking axis first: horizontal first filters each input row down to the
 * output width as it enters the window; vertical first combines full-width rows, then filters
 * the one combined row. Not in place; allocates only when built.
 */
export function resampleStream(
  source: RowSource,
  tx: WeightTable | null,
  ty: WeightTable,
  o0: number,
  o1: number,
  alloc: (n: number) => Float32Array = (n) => new Float32Array(n),
): RowSource {
  const lanes = source.lanes;
  const dstW = tx ? tx.dstLen : source.width;
  const { hFirst, rowLen, capacity, sizes } = streamLayout(source.width, lanes, tx, ty, o0, o1, ty.simd !== undefined);
  const win = alloc(sizes[0]);
  const line = alloc(sizes[1]);
  const mixed = hFirst || !tx ? line : alloc(sizes[2]);
  let winLo = o1 > o0 ? ty.start[o0] : 0;
  let winHi = winLo;
  return {
    width: dstW,
    lanes,
    read(o: number, out: Float32Array, at: number): void {
      const lo = ty.start[o];
      const hi = lo + ty.taps;
      if (hi - winLo > capacity) {
        const keep = Math.max(lo, winLo);
        if (keep < winHi) win.copyWithin(0, (keep - winLo) * rowLen, (winHi - winLo) * rowLen);
        else winHi = keep;
        winLo = keep;
      }
      for (let y = winHi; y < hi; y++) {
        const slot = (y - winLo) * rowLen;
        if (hFirst) {
          source.read(y, line, 0);
          resampleAxis(win, slot, lanes, line, 0, lanes, lanes, tx!, 0, dstW);
        } else {
          source.read(y, win, slot);
        }
      }
      if (hi > winHi) winHi = hi;
      if (hFirst || !tx) {
        resampleAxis(out, at - o * rowLen, rowLen, win, -winLo * rowLen, rowLen, rowLen, ty, o, o + 1);
      } else {
        resampleAxis(mixed, -o * rowLen, rowLen, win, -winLo * rowLen, rowLen, rowLen, ty, o, o + 1);
        resampleAxis(out, at, lanes, mixed, 0, lanes, lanes, tx, 0, dstW);
      }
    },
  };
}
