import type { AxisFilter } from './filter.js';
import type { SimdKernels } from '../simd/index.js';

/**
 * A resampling weight table for one axis: output pixel o is
 *   sum_{k < taps} weights[o * taps + k] * in[start[o] + k].
 * Every row sums to 1 (normalised per output pixel) and reads only indices in [0, srcLen).
 */
export interface WeightTable {
  readonly srcLen: number;
  readonly dstLen: number;
  readonly taps: number;
  readonly start: Int32Array;
  readonly weights: Float32Array;
  /** Centre of each output pixel in input coordinates (for responses and tests). */
  readonly centre: Float64Array;
  /**
   * Set when every row that does not touch the border is the same symmetric 5-tap row
   * [c, b, a, b, c] starting at 2o - 2 (the pyramid's reduce): a faster loop serves those rows.
   */
  readonly symmetric5?: readonly [number, number, number];
  /**
   * Set on a copy placed in the SIMD memory (start and weights there): passes whose buffers are
   * in that memory too run the compiled f32x4 loops.
   */
  readonly simd?: SimdKernels;
  /**
   * Set when the kernel limits ringing (limit.ts): per output, [first input index, count] of
   * the central lobe's taps; each output is clamped to the range of those inputs.
   */
  readonly lobe?: Int32Array;
}

/**
 * Writes row * inv as float32 and moves the float32 rounding left over onto the largest
 * weight, so the stored row sums to 1 as closely as float32 allows (flat fields stay flat).
 */
function storeNormalised(row: Float64Array, inv: number, out: Float32Array, at: number): void {
  let big = 0;
  let sum = 0;
  for (let k = 0; k < row.length; k++) {
    out[at + k] = row[k] * inv;
    sum += out[at + k];
    if (Math.abs(row[k]) > Math.abs(row[big])) big = k;
  }
  out[at + big] += 1 - sum;
}

function mirror(j: number, n: number): number {
  const m = j < 0 ? -j : j >= n ? 2 * n - 2 - j : j;
  return m < 0 ? 0 : m >= n ? n - 1 : m;
}

/**
 * Builds the table for centres c(o) = origin + o * step (input pixel coordinates, pixel
 * centres at integers) and the filter f evaluated at (j - c(o)).
 *
 * Edge mode: mirror about the edge pixel (whole-sample symmetric: tap -1 reads pixel 1, tap n
 * reads pixel n - 2; OpenCV's default border, common practice), folding the weight onto that
 * pixel, then the row is normalised to sum 1. A whole-sample mirror continues a pattern near
 * the Nyquist frequency in phase, so the low-pass still removes it at the border; clamping
 * repeats the edge pixel and a half-sample mirror flips the pattern's sign, and both left an
 * alias band along the border of the zone plate (-34 and -31 dB at 2x against -41 dB inside,
 * scripts/fidelity.ts). A flat field stays flat. Taps beyond one image length are clamped.
 * If a row's weights sum to (almost) nothing, the nearest pixel gets weight 1.
 */
export function buildWeights(
  srcLen: number,
  dstLen: number,
  origin: number,
  step: number,
  f: AxisFilter,
): WeightTable {
  const reach = f.support;
  const centre = new Float64Array(dstLen);
  const lo = new Int32Array(dstLen);
  const hi = new Int32Array(dstLen);
  let span = 1;
  for (let o = 0; o < dstLen; o++) {
    const c = origin + o * step;
    centre[o] = c;
    const first = Math.ceil(c - reach);
    const last = Math.floor(c + reach);
    let a = srcLen - 1;
    let b = 0;
    for (let j = first; j <= last; j++) {
      const m = mirror(j, srcLen);
      if (m < a) a = m;
      if (m > b) b = m;
    }
    lo[o] = Math.min(a, b);
    hi[o] = b;
    span = Math.max(span, hi[o] - lo[o] + 1);
  }
  const taps = Math.min(span, srcLen);
  const start = new Int32Array(dstLen);
  const row64 = new Float64Array(taps);
  const weights = new Float32Array(dstLen * taps);
  const period = periodOf(step, dstLen);
  const shift = Math.round(period * step);
  for (let o = 0; o < dstLen; o++) {
    const c = centre[o];
    const s = Math.min(lo[o], srcLen - taps);
    start[o] = s;
    const row = o * taps;
    const first = Math.ceil(c - reach);
    const last = Math.floor(c + reach);
    // A row one period on from an inner row (no mirrored or clamped tap in either: row p's taps
    // are this one's `shift` pixels back, inside when the first is not before pixel 0, and
    // unclamped since this row is) whose centre lies exactly `shift` pixels on has the very
    // same filter arguments, (j + shift) - c = j - (c - shift), each the one rounding of the
    // same real: its weights are copied, bit for bit.
    if (period > 0 && o >= period && first >= 0 && last < srcLen && s === first) {
      const p = o - period;
      const pc = centre[p];
      if (first >= shift && exactlyShifted(c, shift, pc) && Math.ceil(pc - reach) === first - shift && Math.floor(pc + reach) === last - shift) {
        weights.copyWithin(row, p * taps, p * taps + taps);
        continue;
      }
    }
    row64.fill(0);
    for (let j = first; j <= last; j++) row64[mirror(j, srcLen) - s] += f.at(j - c);
    let sum = 0;
    for (let k = 0; k < taps; k++) sum += row64[k];
    if (Math.abs(sum) < 1e-9) {
      weights[row + Math.min(taps - 1, Math.max(0, Math.round(c) - s))] = 1;
      continue;
    }
    storeNormalised(row64, 1 / sum, weights, row);
  }
  return { srcLen, dstLen, taps, start, weights, centre };
}

/** The longest period looked for: a table of a common size ratio repeats within a few dozen rows. */
const MAX_PERIOD = 512;

/**
 * The smallest P > 0 (up to MAX_PERIOD, and below `dstLen`) for which P output pixels span a
 * whole number of input pixels, P * step within 1e-11 of an integer: centres P apart then share
 * their phase, and so do their rows of weights (2304 -> 800 px: step 2.88, P = 25). 0 when
 * there is none; the table is then evaluated row by row.
 */
export function periodOf(step: number, dstLen: number): number {
  const most = Math.min(MAX_PERIOD, dstLen - 1);
  for (let p = 1; p <= most; p++) {
    const span = p * step;
    if (Math.abs(span - Math.round(span)) < 1e-11 && Math.round(span) > 0) return p;
  }
  return 0;
}

/**
 * Whether c - shift equals pc exactly, in reals: the floating-point difference is pc and had no
 * rounding (TwoSum's error term is 0; Knuth, TAOCP vol. 2, 4.2.2, from memory).
 */
function exactlyShifted(c: number, shift: number, pc: number): boolean {
  const d = c - shift;
  if (d !== pc) return false;
  const back = d - c;
  return c - (d - back) + (-shift - back) === 0;
}
