/**
 * Figures of merit for a downscaled analytic pattern, all computed in linear light from 8-bit
 * sRGB output. Output pixel o sits at source x = (o + 1/2) s - 1/2 (the pixel-centre
 * convention); the new Nyquist frequency is 1 / (2 s) cycles per source pixel.
 */
import { decode8 as srgbToLinear8 } from './srgb.js';

/** A grey 8-bit output (one sample per pixel) with its per-axis factors. */
export interface Output {
  data: Uint8Array;
  width: number;
  height: number;
  sx: number;
  sy: number;
}

const db = (ratio: number) => 20 * Math.log10(ratio);
/** RMS of the zone plate's oscillating part 0.5 cos(.), the reference level (0.5 / sqrt 2). */
const PATTERN_RMS = 0.5 / Math.SQRT2;

export interface ZoneFigures {
  /** RMS of (out - 0.5) where max(|fx|, |fy|) >= 1.3x new Nyquist, dB re pattern RMS. */
  residualDb: number;
  /** Mean of the stop region as an sRGB code (flat 0.5 is 187.5). */
  stopMeanCode: number;
  /** RMS of (out - pattern) where max(|fx|, |fy|) <= 0.5x new Nyquist, dB re pattern RMS. */
  passbandDb: number;
}

export function zoneFigures(out: Output, n: number, pattern: (x: number, y: number) => number): ZoneFigures {
  const c = (n - 1) / 2;
  const nyq = 0.5 / Math.max(out.sx, out.sy);
  let stopSq = 0, stopSum = 0, stopN = 0, passSq = 0, passN = 0;
  for (let oy = 0; oy < out.height; oy++) {
    const y = (oy + 0.5) * out.sy - 0.5;
    for (let ox = 0; ox < out.width; ox++) {
      const x = (ox + 0.5) * out.sx - 0.5;
      const f = Math.max(Math.abs(x - c), Math.abs(y - c)) / n;
      const v = srgbToLinear8[out.data[oy * out.width + ox]];
      if (f >= 1.3 * nyq) {
        stopSq += (v - 0.5) ** 2;
        stopSum += v;
        stopN++;
      } else if (f <= 0.5 * nyq) {
        passSq += (v - pattern(x, y)) ** 2;
        passN++;
      }
    }
  }
  const mean = stopSum / stopN;
  return {
    residualDb: db(Math.sqrt(stopSq / stopN) / PATTERN_RMS),
    stopMeanCode: 255 * (mean <= 0.0031308 ? 12.92 * mean : 1.055 * mean ** (1 / 2.4) - 0.055),
    passbandDb: db(Math.sqrt(passSq / passN) / PATTERN_RMS),
  };
}

/**
 * Amplitude of the sinusoid at `f` cycles per source pixel in the middle rows and the inner
 * 80 % of columns of a grating output, by least squares on cos and sin, divided by `amp`.
 */
export function gratingKept(out: Output, f: number, amp: number): number {
  const y = out.height >> 1;
  const lo = Math.floor(out.width * 0.1);
  const hi = Math.ceil(out.width * 0.9);
  let cc = 0, ss = 0, cs = 0, vc = 0, vs = 0, v0 = 0, c0 = 0, s0 = 0, n = 0;
  for (let o = lo; o < hi; o++) {
    const x = (o + 0.5) * out.sx - 0.5;
    const v = srgbToLinear8[out.data[y * out.width + o]];
    const co = Math.cos(2 * Math.PI * f * x), si = Math.sin(2 * Math.PI * f * x);
    cc += co * co; ss += si * si; cs += co * si; vc += v * co; vs += v * si;
    v0 += v; c0 += co; s0 += si; n++;
  }
  // Remove the mean first (the grating sits on 0.5), then solve the 2x2 normal equations.
  const m = v0 / n;
  vc -= m * c0; vs -= m * s0; cc -= (c0 * c0) / n; ss -= (s0 * s0) / n; cs -= (c0 * s0) / n;
  const det = cc * ss - cs * cs;
  const a = (vc * ss - vs * cs) / det;
  const b = (vs * cc - vc * cs) / det;
  return Math.hypot(a, b) / amp;
}

/** Largest excursion beyond the plateaus [low, high] along the middle row, as a fraction of the step. */
export function overshoot(out: Output, low: number, high: number): number {
  const y = out.height >> 1;
  let worst = 0;
  for (let o = 0; o < out.width; o++) {
    const v = srgbToLinear8[out.data[y * out.width + o]];
    worst = Math.max(worst, v - high, low - v);
  }
  return worst / (high - low);
}

/** Mean code of the inner 80 % of an output (the stripes test). */
export function innerMeanCode(out: Output): number {
  let sum = 0, n = 0;
  for (let y = Math.floor(out.height * 0.1); y < Math.ceil(out.height * 0.9); y++) {
    for (let x = Math.floor(out.width * 0.1); x < Math.ceil(out.width * 0.9); x++) {
      sum += out.data[y * out.width + x];
      n++;
    }
  }
  return sum / n;
}
