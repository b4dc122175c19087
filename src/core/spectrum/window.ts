/**
 * Periodic Hann window w[n] = 0.5 - 0.5 cos(2 pi n / L), n < L (Harris, F. J. (1978), "On the
 * use of windows for harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1)).
 * Periodic rather than symmetric so that 50 % overlapped copies add to a constant; its sums
 * are exactly sum w = L/2 and sum w^2 = 3L/8 for L >= 4.
 */

const windows = new Map<number, Float64Array>();

/** The cached periodic Hann window of length `length` (an integer >= 1). Do not mutate it. */
export function hannWindow(length: number): Float64Array {
  const cached = windows.get(length);
  if (cached) return cached;
  if (!(Number.isInteger(length) && length >= 1)) {
    throw new RangeError(`window length must be a positive integer, got ${length}`);
  }
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) w[n] = 0.5 - 0.5 * Math.cos((2 * Math.PI * n) / length);
  windows.set(length, w);
  return w;
}

const windows2d = new Map<number, Float64Array>();

/** The separable 2-D periodic Hann window w(x) w(y), row-major, cached per side. Do not mutate it. */
export function window2d(t: number): Float64Array {
  let w2 = windows2d.get(t);
  if (!w2) {
    const w = hannWindow(t);
    w2 = new Float64Array(t * t);
    for (let y = 0; y < t; y++) for (let x = 0; x < t; x++) w2[y * t + x] = w[x] * w[y];
    windows2d.set(t, w2);
  }
  return w2;
}
