import { resampleAxis } from './separable.js';
import type { WeightTable } from './weights.js';

/** Rows of working floats, produced on demand (decoded source rows, or a pyramid level's). */
export interface RowSource {
  readonly width: number;
  readonly height: number;
  readonly lanes: number;
  /** Writes row y (width * lanes floats) to out[at...]. */
  read(y: number, out: Float32Array, at: number): void;
}

/** Receives output row o (tx.dstLen * lanes floats at row[at...]). */
export type RowSink = (o: number, row: Float32Array, at: number) => void;

/** Output rows per strip: large enough that the rows shared by neighbouring strips are few. */
const STRIP = 16;

/**
 * Separable resample of `source` through tables tx (columns) and ty (rows), for output rows
 * [o0, o1), strip by strip. A sliding window holds only the input rows the current strip
 * needs (rows it shares with the next strip are kept, never recomputed), so no full float copy
 * of the source ever exists. The cheaper axis order is taken, which is the more-shrinking axis
 * first: horizontal first filters each needed row down to the output width before the vertical
 * pass; vertical first combines full-width rows, then filters each output row. Not in place.
 */
export function resampleStrips(
  source: RowSource,
  tx: WeightTable,
  ty: WeightTable,
  o0: number,
  o1: number,
  sink: RowSink,
): void {
  if (o1 <= o0) return;
  const lanes = source.lanes;
  const dstW = tx.dstLen;
  const needed = ty.start[o1 - 1] + ty.taps - ty.start[o0];
  const hFirstCost = needed * dstW * tx.taps + (o1 - o0) * dstW * ty.taps;
  const vFirstCost = (o1 - o0) * (source.width * ty.taps + dstW * tx.taps);
  const hFirst = hFirstCost <= vFirstCost;
  const rowLen = (hFirst ? dstW : source.width) * lanes;

  let maxRows = 0;
  for (let b = o0; b < o1; b += STRIP) {
    const e = Math.min(b + STRIP, o1);
    maxRows = Math.max(maxRows, ty.start[e - 1] + ty.taps - ty.start[b]);
  }
  const win = new Float32Array(maxRows * rowLen);
  const vout = new Float32Array(STRIP * rowLen);
  const line = new Float32Array((hFirst ? source.width : dstW) * lanes);
  let winLo = 0;
  let winHi = 0;
  for (let b = o0; b < o1; b += STRIP) {
    const e = Math.min(b + STRIP, o1);
    const lo = ty.start[b];
    const hi = ty.start[e - 1] + ty.taps;
    if (lo >= winHi) {
      winLo = winHi = lo;
    } else if (lo > winLo) {
      win.copyWithin(0, (lo - winLo) * rowLen, (winHi - winLo) * rowLen);
      winLo = lo;
    }
    for (let y = winHi; y < hi; y++) {
      const at = (y - winLo) * rowLen;
      if (hFirst) {
        source.read(y, line, 0);
        resampleAxis(win, at, lanes, line, 0, lanes, lanes, tx, 0, dstW);
      } else {
        source.read(y, win, at);
      }
    }
    winHi = Math.max(winHi, hi);
    resampleAxis(vout, -b * rowLen, rowLen, win, -winLo * rowLen, rowLen, rowLen, ty, b, e);
    for (let o = b; o < e; o++) {
      if (hFirst) {
        sink(o, vout, (o - b) * rowLen);
      } else {
        resampleAxis(line, 0, lanes, vout, (o - b) * rowLen, lanes, lanes, tx, 0, dstW);
        sink(o, line, 0);
      }
    }
  }
}
