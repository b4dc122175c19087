/**
 * Measurements on real renders, made with the npm package fft.js (an FFT nobody here wrote,
 * CHECKS.md) rather than with the code under test.
 */
import FFT from 'fft.js';

/** In-place 2-D complex FFT of an n x n interleaved [re, im] array with fft.js; inverse if asked. */
export function fft2dReference(data: Float64Array, n: number, inverse = false): void {
  const f = new FFT(n);
  const line = f.createComplexArray();
  const out = f.createComplexArray();
  for (let pass = 0; pass < 2; pass++) {
    for (let r = 0; r < n; r++) {
      for (let i = 0; i < n; i++) {
        const k = pass === 0 ? r * n + i : i * n + r;
        line[2 * i] = data[2 * k];
        line[2 * i + 1] = data[2 * k + 1];
      }
      if (inverse) f.inverseTransform(out, line);
      else f.transform(out, line);
      for (let i = 0; i < n; i++) {
        const k = pass === 0 ? r * n + i : i * n + r;
        data[2 * k] = out[2 * i];
        data[2 * k + 1] = out[2 * i + 1];
      }
    }
  }
}

/**
 * Ideal linear-light reference: the periodic n x n image with every component beyond the
 * new Nyquist (|fx| > nx or |fy| > ny cycles/px) removed (sampling theorem: Shannon 1949).
 */
export function bandLimited(lin: Float64Array, n: number, nx: number, ny: number): Float64Array {
  const z = new Float64Array(2 * n * n);
  for (let i = 0; i < n * n; i++) z[2 * i] = lin[i];
  fft2dReference(z, n);
  for (let v = 0; v < n; v++) {
    const fy = Math.abs((v < n / 2 ? v : v - n) / n);
    for (let u = 0; u < n; u++) {
      const fx = Math.abs((u < n / 2 ? u : u - n) / n);
      if (fx > nx + 1e-12 || fy > ny + 1e-12) z[2 * (v * n + u)] = z[2 * (v * n + u) + 1] = 0;
    }
  }
  fft2dReference(z, n, true);
  const out = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) out[i] = z[2 * i];
  return out;
}

/** Power spectrum (|X|^2 / n^4, so it sums to the mean square) of an n x n real image, natural order. */
export function powerSpectrum(lin: Float64Array, n: number): Float64Array {
  const z = new Float64Array(2 * n * n);
  for (let i = 0; i < n * n; i++) z[2 * i] = lin[i];
  fft2dReference(z, n);
  const p = new Float64Array(n * n);
  const k = 1 / (n * n) ** 2;
  for (let i = 0; i < n * n; i++) p[i] = (z[2 * i] ** 2 + z[2 * i + 1] ** 2) * k;
  return p;
}

/**
 * Strongest frequency (cycles per pixel, 0..0.5) in the rows of a w x h image: row spectra
 * through a periodic Hann window, averaged, peak refined by a log parabola.
 */
export function rowPeak(lin: Float64Array, w: number, h: number): number {
  const f = new FFT(w);
  const line = f.createComplexArray();
  const out = f.createComplexArray();
  const acc = new Float64Array(w / 2 + 1);
  for (let y = 0; y < h; y++) {
    let mean = 0;
    for (let x = 0; x < w; x++) mean += lin[y * w + x] / w;
    for (let x = 0; x < w; x++) {
      line[2 * x] = (lin[y * w + x] - mean) * (0.5 - 0.5 * Math.cos((2 * Math.PI * x) / w));
      line[2 * x + 1] = 0;
    }
    f.transform(out, line);
    for (let k = 0; k <= w / 2; k++) acc[k] += out[2 * k] ** 2 + out[2 * k + 1] ** 2;
  }
  let k = 1;
  for (let i = 1; i <= w / 2; i++) if (acc[i] > acc[k]) k = i;
  if (k === 0 || k === w / 2) return k / w;
  const a = Math.log(acc[k - 1]);
  const b = Math.log(acc[k]);
  const c = Math.log(acc[k + 1]);
  return (k + (0.5 * (a - c)) / (a - 2 * b + c)) / w;
}

/** Spearman rank correlation (Spearman 1904): Pearson correlation of the ranks, ties averaged. */
export function spearman(a: number[], b: number[]): number {
  const ranks = (v: number[]) => {
    const idx = v.map((x, i) => [x, i] as const).sort((p, q) => p[0] - q[0]);
    const r = new Array<number>(v.length);
    for (let i = 0; i < idx.length; ) {
      let j = i;
      while (j + 1 < idx.length && idx[j + 1][0] === idx[i][0]) j++;
      for (let k = i; k <= j; k++) r[idx[k][1]] = (i + j) / 2;
      i = j + 1;
    }
    return r;
  };
  const ra = ranks(a);
  const rb = ranks(b);
  const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length;
  const ma = mean(ra);
  const mb = mean(rb);
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < ra.length; i++) {
    sab += (ra[i] - ma) * (rb[i] - mb);
    saa += (ra[i] - ma) ** 2;
    sbb += (rb[i] - mb) ** 2;
  }
  return sab / Math.sqrt(saa * sbb);
}

/**
 * The band-limited reference (bandLimited) read `d` pixels further along both axes: each
 * component multiplied by exp(2 pi i k d / n) (the shift theorem), so an output pixel centred
 * between source pixels has its exact ideal value.
 */
export function shiftedBandLimited(lin: Float64Array, n: number, nx: number, ny: number, d: number): Float64Array {
  const z = new Float64Array(2 * n * n);
  for (let i = 0; i < n * n; i++) z[2 * i] = lin[i];
  fft2dReference(z, n);
  for (let v = 0; v < n; v++) {
    const kv = v < n / 2 ? v : v - n;
    for (let u = 0; u < n; u++) {
      const ku = u < n / 2 ? u : u - n;
      const i = 2 * (v * n + u);
      if (Math.abs(ku / n) > nx + 1e-12 || Math.abs(kv / n) > ny + 1e-12 || Math.abs(ku) === n / 2 || Math.abs(kv) === n / 2) {
        z[i] = z[i + 1] = 0;
        continue;
      }
      const p = (2 * Math.PI * (ku + kv) * d) / n;
      const re = z[i] * Math.cos(p) - z[i + 1] * Math.sin(p);
      z[i + 1] = z[i] * Math.sin(p) + z[i + 1] * Math.cos(p);
      z[i] = re;
    }
  }
  fft2dReference(z, n, true);
  const out = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) out[i] = z[2 * i];
  return out;
}
