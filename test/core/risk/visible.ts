/**
 * Measured visibility of the false patterns in a real render of any picture (not only periodic
 * ones), in threshold units. Reference: the picture mirrored into a 2N x 2N periodic image
 * (even symmetry, so no edge jump), band-limited to the new Nyquist with fft.js (the ideal,
 * infinitely long low-pass, Shannon 1949) and read at each output pixel's own centre, d source
 * px along (the shift theorem). Error = render - reference, both linear light, under a Hann
 * window (so the picture's borders, where renderer and reference extend the edge differently,
 * weigh nothing); its power spectrum weighted by the squared sensitivity at each output
 * frequency (Mannos & Sakrison 1974 at the CSS reference pixel); plus the render's own content
 * between 0.85x and 1x Nyquist shown through square pixels (the beat: sinc(1 - u) / sinc(u) of
 * it, at the carrier's sensitivity, CHECKS.md). Amplitude-equivalent, over the mean.
 */
import { contrastThreshold, CSS_PIXEL_DEGREES } from '../../../src/core/risk/index.js';
import { fft2dReference, powerSpectrum } from './measure.js';

const sinc = (x: number) => (x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x));
const sensitivity = (cyclesPerPixel: number) => 1 / contrastThreshold(cyclesPerPixel / CSS_PIXEL_DEGREES);

/** The forward spectrum of the N x N linear image mirrored to 2N x 2N, interleaved [re, im]. */
export function mirroredSpectrum(lin: Float64Array, n: number): Float64Array {
  const e = 2 * n;
  const m = (i: number) => (i < n ? i : e - 1 - i);
  const z = new Float64Array(2 * e * e);
  for (let y = 0; y < e; y++) for (let x = 0; x < e; x++) z[2 * (y * e + x)] = lin[m(y) * n + m(x)];
  fft2dReference(z, e);
  return z;
}

/** A filter's gain per axis at |f| source cycles per pixel. */
export type Gains = (axis: 'x' | 'y', f: number) => number;
const flat: Gains = () => 1;

/**
 * The ideal rendition: the mirrored picture band-limited to |f| < 1/(2s) per axis, sampled at
 * source positions s o + d (o = 0..n/s - 1). Computed as a size-2n/s inverse FFT of the kept
 * band, which holds exactly those samples. With `gain`, the kept band goes through that filter
 * first: the rendition the plan would make if sampling folded nothing, so render minus it is
 * the false pattern alone, not the plan's deliberate softening.
 */
export function idealRendition(z: Float64Array, n: number, s: number, d: number, gain: Gains = flat): Float64Array {
  const e = 2 * n;
  const m = e / s;
  const y = new Float64Array(2 * m * m);
  const gx = Float64Array.from({ length: m }, (_, i) => gain('x', Math.abs(i - m / 2) / e));
  const gy = Float64Array.from({ length: m }, (_, i) => gain('y', Math.abs(i - m / 2) / e));
  for (let v = -m / 2 + 1; v < m / 2; v++) {
    for (let u = -m / 2 + 1; u < m / 2; u++) {
      const k = 2 * (((v + e) % e) * e + ((u + e) % e));
      const p = (2 * Math.PI * (u + v) * d) / e;
      const t = 2 * (((v + m) % m) * m + ((u + m) % m));
      const g = gx[u + m / 2] * gy[v + m / 2];
      y[t] = g * (z[k] * Math.cos(p) - z[k + 1] * Math.sin(p));
      y[t + 1] = g * (z[k] * Math.sin(p) + z[k + 1] * Math.cos(p));
    }
  }
  fft2dReference(y, m, true);
  const out = new Float64Array((m / 2) * (m / 2));
  const k = (m * m) / (e * e);
  for (let oy = 0; oy < m / 2; oy++) for (let ox = 0; ox < m / 2; ox++) out[oy * (m / 2) + ox] = y[2 * (oy * m + ox)] * k;
  return out;
}

/** Threshold-unit visibility of render `out` (linear, m x m) against `ideal`, picture mean `mean`. */
export function measuredVisibility(out: Float64Array, ideal: Float64Array, m: number, mean: number): number {
  const w = new Float64Array(m);
  for (let i = 0; i < m; i++) w[i] = Math.sin((Math.PI * (i + 0.5)) / m) ** 2;
  let w2 = 0;
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) w2 += (w[i] * w[j]) ** 2 / (m * m);
  let own = 0;
  for (const v of out) own += v / out.length;
  const err = new Float64Array(m * m);
  const shown = new Float64Array(m * m);
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < m; i++) {
      const k = j * m + i;
      err[k] = (out[k] - ideal[k]) * w[i] * w[j];
      shown[k] = (out[k] - own) * w[i] * w[j];
    }
  }
  return Math.sqrt((2 * sensitivityWeightedPower(powerSpectrum(err, m), powerSpectrum(shown, m), m)) / w2) / mean;
}

/**
 * The error's power spectrum `pe` weighted by the squared sensitivity at each output frequency
 * (Mannos & Sakrison 1974 at the CSS reference pixel), plus the render's own power `po` between
 * 0.85x and 1x Nyquist as square pixels show it (the beat: sinc(1 - u) / sinc(u) of it, at the
 * carrier's sensitivity). m x m spectra, unshifted.
 */
export function sensitivityWeightedPower(pe: Float64Array, po: Float64Array, m: number): number {
  let v = 0;
  for (let j = 0; j < m; j++) {
    const fy = (j < m / 2 ? j : j - m) / m;
    for (let i = 0; i < m; i++) {
      const fx = (i < m / 2 ? i : i - m) / m;
      const f = Math.hypot(fx, fy);
      const s2 = sensitivity(f) ** 2;
      v += pe[j * m + i] * s2;
      const u = Math.max(Math.abs(fx), Math.abs(fy));
      if (u >= 0.85 * 0.5) v += po[j * m + i] * Math.min(1, sinc(1 - u) / sinc(u)) ** 2 * s2;
    }
  }
  return v;
}

