/**
 * The planned filter's response sampled once on the spectrum's frequency grid (k / T cycles
 * per source pixel), optionally cascaded with an extra Gaussian. Sampling once keeps the
 * caller's response function (which sums a weight table) out of the search loops.
 */
import { gaussianResponse, type AxisResponse } from './model.js';

/** The caller's response: magnitude of the planned filter of one axis at f source cycles/px. */
export type PlanResponse = (axis: 'x' | 'y', f: number) => number;

/** |H(k / T)| for k = 0..T/2 of one axis. */
export function sampleResponse(response: PlanResponse, axis: 'x' | 'y', tileSize: number): Float64Array {
  const out = new Float64Array((tileSize >> 1) + 1);
  for (let k = 0; k < out.length; k++) out[k] = Math.abs(response(axis, k / tileSize));
  return out;
}

/**
 * An axis response reading the sampled table at the nearest grid frequency, times a Gaussian
 * of `extraSigma` source pixels (a cascade of the plan and an extra blur).
 */
export function withExtraBlur(sampled: Float64Array, tileSize: number, extraSigma: number): AxisResponse {
  const last = sampled.length - 1;
  return (f: number) => {
    const k = Math.min(last, Math.round(Math.abs(f) * tileSize));
    return extraSigma > 0 ? sampled[k] * gaussianResponse(extraSigma, f) : sampled[k];
  };
}
