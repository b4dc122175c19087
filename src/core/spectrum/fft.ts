/**
 * Complex radix-2 FFT (Cooley & Tukey, 1965, "An algorithm for the machine calculation of
 * complex Fourier series", Math. Comp. 19(90)), iterative decimation in time.
 *
 * Convention: forward, unnormalised, X[k] = sum_n x[n] exp(-2 pi i k n / N); bin k holds the
 * frequency k/N cycles per sample for k < N/2 and (k - N)/N above (natural order).
 */

/** Precomputed twiddles and bit-reversal table for one power-of-two size. */
export interface FftPlan {
  readonly size: number;
  /** Per-stage twiddles: entry h + k (h = 1, 2, 4, ..., N/2; k < h) is cos(pi k / h). */
  readonly cos: Float64Array;
  /** Entry h + k is -sin(pi k / h) (the forward sign). */
  readonly sin: Float64Array;
  /** bit-reversed index of every k < N */
  readonly bitrev: Uint32Array;
}

const plans = new Map<number, FftPlan>();

/** The cached plan for `size` (a power of two, 1..2^20); throws RangeError otherwise. */
export function fftPlan(size: number): FftPlan {
  const cached = plans.get(size);
  if (cached) return cached;
  if (!(Number.isInteger(size) && size >= 1 && size <= 1 << 20 && (size & (size - 1)) === 0)) {
    throw new RangeError(`FFT size must be a power of two in 1..2^20, got ${size}`);
  }
  const cos = new Float64Array(Math.max(1, size));
  const sin = new Float64Array(Math.max(1, size));
  for (let h = 1; h < size; h <<= 1) {
    for (let k = 0; k < h; k++) {
      cos[h + k] = Math.cos((Math.PI * k) / h);
      sin[h + k] = -Math.sin((Math.PI * k) / h);
    }
  }
  const bits = Math.round(Math.log2(size));
  const bitrev = new Uint32Array(size);
  for (let k = 0; k < size; k++) {
    let r = 0;
    for (let b = 0, v = k; b < bits; b++, v >>= 1) r = (r << 1) | (v & 1);
    bitrev[k] = r;
  }
  const plan: FftPlan = { size, cos, sin, bitrev };
  plans.set(size, plan);
  return plan;
}

/**
 * Forward FFT of the `plan.size` contiguous complex samples re/im[offset .. offset + size).
 * In place (the output replaces the input); allocates nothing.
 */
export function fftInPlace(plan: FftPlan, re: Float64Array, im: Float64Array, offset: number): void {
  const n = plan.size;
  const rev = plan.bitrev;
  for (let i = 0; i < n; i++) {
    const j = rev[i];
    if (i < j) {
      const a = offset + i;
      const b = offset + j;
      const tr = re[a];
      re[a] = re[b];
      re[b] = tr;
      const ti = im[a];
      im[a] = im[b];
      im[b] = ti;
    }
  }
  const end = offset + n;
  // First stage: twiddle 1, no multiplications.
  for (let a = offset; a + 1 < end; a += 2) {
    const br = re[a + 1];
    const bi = im[a + 1];
    re[a + 1] = re[a] - br;
    im[a + 1] = im[a] - bi;
    re[a] += br;
    im[a] += bi;
  }
  const cos = plan.cos;
  const sin = plan.sin;
  for (let h = 2; h < n; h <<= 1) {
    for (let start = offset; start < end; start += 2 * h) {
      for (let k = 0; k < h; k++) {
        const wr = cos[h + k];
        const wi = sin[h + k];
        const a = start + k;
        const b = a + h;
        const br = re[b];
        const bi = im[b];
        const tr = wr * br - wi * bi;
        const ti = wr * bi + wi * br;
        re[b] = re[a] - tr;
        im[b] = im[a] - ti;
        re[a] += tr;
        im[a] += ti;
      }
    }
  }
}

/** Transpose a square n x n row-major array in place. */
function transpose(a: Float64Array, n: number): void {
  for (let y = 0; y < n; y++) {
    for (let x = y + 1; x < n; x++) {
      const i = y * n + x;
      const j = x * n + y;
      const t = a[i];
      a[i] = a[j];
      a[j] = t;
    }
  }
}

/**
 * Forward 2-D FFT of a size x size complex array, row-major, in place. Rows, then the columns
 * as rows of the transpose (contiguous access is about three times faster than strided
 * columns here), then transposed back. Allocates nothing.
 */
export function fft2d(plan: FftPlan, re: Float64Array, im: Float64Array): void {
  const n = plan.size;
  for (let pass = 0; pass < 2; pass++) {
    for (let r = 0; r < n; r++) fftInPlace(plan, re, im, r * n);
    transpose(re, n);
    transpose(im, n);
  }
}
