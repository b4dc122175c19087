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
  /** cos(2 pi k / N), k < N/2 */
  readonly cos: Float64Array;
  /** sin(2 pi k / N), k < N/2 */
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
  const half = size >> 1;
  const cos = new Float64Array(half);
  const sin = new Float64Array(half);
  for (let k = 0; k < half; k++) {
    cos[k] = Math.cos((2 * Math.PI * k) / size);
    sin[k] = Math.sin((2 * Math.PI * k) / size);
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
 * Forward FFT of the `plan.size` complex samples re/im[offset + j * stride], j < size.
 * In place (the output replaces the input at the same positions); allocates nothing.
 * One routine serves rows (stride 1) and columns (stride = row length).
 */
export function fftStrided(
  plan: FftPlan,
  re: Float64Array,
  im: Float64Array,
  offset: number,
  stride: number,
): void {
  const n = plan.size;
  const rev = plan.bitrev;
  for (let i = 0; i < n; i++) {
    const j = rev[i];
    if (i < j) {
      const a = offset + i * stride;
      const b = offset + j * stride;
      const tr = re[a];
      re[a] = re[b];
      re[b] = tr;
      const ti = im[a];
      im[a] = im[b];
      im[b] = ti;
    }
  }
  const cos = plan.cos;
  const sin = plan.sin;
  for (let span = 2; span <= n; span <<= 1) {
    const half = span >> 1;
    const step = n / span;
    for (let k = 0; k < half; k++) {
      const wr = cos[k * step];
      const wi = -sin[k * step];
      for (let start = k; start < n; start += span) {
        const a = offset + start * stride;
        const b = a + half * stride;
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

/**
 * Forward 2-D FFT of a size x size complex array, row-major, in place; rows then columns.
 * Allocates nothing.
 */
export function fft2d(plan: FftPlan, re: Float64Array, im: Float64Array): void {
  const n = plan.size;
  for (let r = 0; r < n; r++) fftStrided(plan, re, im, r * n, 1);
  for (let c = 0; c < n; c++) fftStrided(plan, re, im, c, n);
}
