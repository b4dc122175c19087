/**
 * The ringing limiter: each output sample of a 1-D pass is clamped to the range of the input
 * samples under the kernel's central lobe (the taps around the centre whose weights are
 * positive). A sharp low-pass rings at a hard edge (Gibbs: about 7-8 % at the worst sub-pixel
 * phase), which shows as dark halos beside light lines and black troughs between pinstripes
 * in linear light; textures and smooth gradients lie inside their local range already, so the
 * clamp leaves them alone. Clamping to the central lobe's neighbourhood is the anti-ringing
 * step of published video scalers (common practice: "anti-ringing" or "de-ringing" filters
 * clamp to the range of the nearest source samples).
 */
import type { WeightTable } from './weights.js';

let limiting = true;

/**
 * The clamp's range is the lobe's [lo, hi] widened above by RING_SLACK of hi - lo (RING_CREST
 * where a crest lies inside the lobe), and below by the same share but at most RING_FLOOR of lo
 * itself (linear light: a dark ground may darken by a quarter of its own light at most, not by
 * a share of the step, so it never turns black). Where the lobe is flat (the far side of an
 * edge, the ground between pinstripes) the clamp is exact, so no halo or black trough
 * survives; where the lobe spans an edge, one end sample sits on each plateau, so the step may
 * overshoot by RING_SLACK at most (2.6 % at the worst phase after 8-bit rounding, 7.8 %
 * unclamped). A texture's crest or trough between two source samples, which the samples' own
 * range would clip (by up to 1 - cos(pi f) of its amplitude at f cycles per source px), has
 * both end samples below (above) it and gets RING_CREST: with 3 % everywhere and 3 % of lo the
 * zone plate's passband was -39.0 dB at 2x and -38.3 dB at 5.33x (crests and troughs clipped);
 * with these it is -41.4 and -43.0 dB (-45.1 and -43.5 unclamped), `npm run fidelity`.
 */
export const RING_SLACK = 0.03;

/**
 * The share of hi - lo a crest (trough) may pass the lobe's range by where both end samples
 * lie below hi (above lo): a texture's crest between samples, not an edge's plateau.
 */
export const RING_CREST = 0.08;

/** The most the clamp's floor lies below the lobe's minimum, as a share of that minimum. */
export const RING_FLOOR = 0.25;

/** Whether tables with central lobes are clamped (on unless a test turns it off). */
export function ringingLimited(): boolean {
  return limiting;
}

/** Turns the limiter off or on, for tests that compare the linear filter chain alone. */
export function setRingingLimited(on: boolean): void {
  limiting = on;
}

/**
 * Per output row o of the table: [first input index, count] of the central lobe's taps,
 * flattened. The lobe starts at the largest weight and extends while the weights stay positive.
 */
export function centralLobes(t: WeightTable): Int32Array {
  const { taps, start, weights, dstLen } = t;
  const lobe = new Int32Array(2 * dstLen);
  for (let o = 0; o < dstLen; o++) {
    const row = o * taps;
    let peak = 0;
    for (let k = 1; k < taps; k++) if (weights[row + k] > weights[row + peak]) peak = k;
    let a = peak;
    let b = peak;
    while (a > 0 && weights[row + a - 1] > 0) a--;
    while (b < taps - 1 && weights[row + b + 1] > 0) b++;
    lobe[2 * o] = start[o] + a;
    lobe[2 * o + 1] = b - a + 1;
  }
  return lobe;
}

/**
 * Clamps dst's outputs [o0, o1) (addressed as in resampleAxis) to the range of src's samples
 * under each output's central lobe, widened as RING_SLACK and RING_FLOOR say, lane by lane.
 * In place on dst; allocates nothing. An output
 * between its lobe's first and last samples is inside the range already, so the lobe is scanned
 * only for the others (most outputs, on smooth content, need two reads).
 */
export function limitRinging(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, lobe: Int32Array, o0: number, o1: number,
): void {
  for (let o = o0; o < o1; o++) {
    const s = srcBase + lobe[2 * o] * srcStep;
    const n = lobe[2 * o + 1];
    const last = s + (n - 1) * srcStep;
    const d = dstBase + o * dstStep;
    for (let l = 0; l < lanes; l++) {
      const v = dst[d + l];
      const a = src[s + l];
      const b = src[last + l];
      if (a <= b ? v >= a && v <= b : v >= b && v <= a) continue;
      let lo = a < b ? a : b;
      let hi = a < b ? b : a;
      for (let j = s + srcStep + l; j < last + l; j += srcStep) {
        const u = src[j];
        if (u < lo) lo = u;
        else if (u > hi) hi = u;
      }
      // The same float32 steps as the SIMD twin: m = slack (hi - lo), hi + m, lo - pmin(m, floor lo)
      // (pmin(a, b) = b < a ? b : a, f32x4.pmin's rule).
      const span = Math.fround(hi - lo);
      const up = Math.fround(Math.fround((a < b ? b : a) < hi ? RING_CREST : RING_SLACK) * span);
      const down = Math.fround(Math.fround((b < a ? b : a) > lo ? RING_CREST : RING_SLACK) * span);
      const own = Math.fround(Math.fround(RING_FLOOR) * lo);
      const floor = Math.fround(lo - (own < down ? own : down));
      const ceil = Math.fround(hi + up);
      if (v < floor) dst[d + l] = floor;
      else if (v > ceil) dst[d + l] = ceil;
    }
  }
}

/**
 * The limiter after one resampleAxis pass: the SIMD twin when the arrays live in its memory.
 * Kept as a pass of its own after the filter: with the same bytes, each of these measured
 * slower on issue 15's pictures (`scripts/bench/resample-stages.ts`' renders, A/B in one
 * process): the many-lanes filter and limiter fused with all taps summed in registers per
 * strip of lanes (1.1-1.2x), fused in the filter's sweeps with the lobe's sweep leaving the
 * bounds in scratch rows (1.06-1.18x), both passes run on slices of 1024-4096 lanes so the
 * lobe's rows stay cached (1.02-1.10x), and an early exit where every lane lies between its
 * lobe's end samples (1.04-1.14x: on varied texture that is rarely all four lanes).
 */
export function limitPass(
  dst: Float32Array, dstBase: number, dstStep: number, src: Float32Array, srcBase: number,
  srcStep: number, lanes: number, table: WeightTable, o0: number, o1: number,
): void {
  const { lobe, simd: k } = table;
  if (!lobe || !limiting) return;
  if (k && dst.buffer === k.memory.buffer && src.buffer === dst.buffer && lobe.buffer === dst.buffer) {
    k.limit(dst.byteOffset, dstBase, dstStep, src.byteOffset, srcBase, srcStep, lanes, lobe.byteOffset, o0, o1, RING_SLACK, RING_CREST, RING_FLOOR);
  } else {
    limitRinging(dst, dstBase, dstStep, src, srcBase, srcStep, lanes, lobe, o0, o1);
  }
}
