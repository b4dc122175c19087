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
  /** Pairs (i, j), i < j, that the bit-reversal permutation swaps, flattened. */
  readonly swaps: Uint32Array;
  /** Entry k is k with its log2(size) bits reversed: where sample k goes before the stages. */
  readonly rev: Uint32Array;
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
  const pairs: number[] = [];
  const rev = new Uint32Array(size);
  for (let k = 0; k < size; k++) {
    let r = 0;
    for (let b = 0, v = k; b < bits; b++, v >>= 1) r = (r << 1) | (v & 1);
    rev[k] = r;
    if (k < r) pairs.push(k, r);
  }
  const plan: FftPlan = { size, cos, sin, swaps: Uint32Array.from(pairs), rev };
  plans.set(size, plan);
  return plan;
}

/**
 * Forward FFT of the `plan.size` contiguous complex samples re/im[offset .. offset + size).
 * In place (the output replaces the input); allocates nothing. Pairs of radix-2 stages run
 * as one radix-2^2 pass (half the loads and stores of two radix-2 passes, the same twiddles).
 */
export function fftInPlace(plan: FftPlan, re: Float64Array, im: Float64Array, offset: number): void {
  const swaps = plan.swaps;
  for (let p = 0; p < swaps.length; p += 2) {
    const a = offset + swaps[p];
    const b = offset + swaps[p + 1];
    const tr = re[a];
    re[a] = re[b];
    re[b] = tr;
    const ti = im[a];
    im[a] = im[b];
    im[b] = ti;
  }
  fftStages(plan, re, im, offset);
}

/**
 * The butterfly stages of fftInPlace alone, for samples already in bit-reversed order
 * (sample k at offset + plan.rev[k]); the output is in natural order. Allocates nothing.
 */
export function fftStages(plan: FftPlan, re: Float64Array, im: Float64Array, offset: number): void {
  const n = plan.size;
  const end = offset + n;
  let h = 1;
  if (n >= 4) {
    // Stages h = 1 and 2: twiddles 1 and -i only.
    for (let a = offset; a < end; a += 4) {
      const r0 = re[a] + re[a + 1];
      const i0 = im[a] + im[a + 1];
      const r1 = re[a] - re[a + 1];
      const i1 = im[a] - im[a + 1];
      const r2 = re[a + 2] + re[a + 3];
      const i2 = im[a + 2] + im[a + 3];
      const r3 = re[a + 2] - re[a + 3];
      const i3 = im[a + 2] - im[a + 3];
      re[a] = r0 + r2;
      im[a] = i0 + i2;
      re[a + 2] = r0 - r2;
      im[a + 2] = i0 - i2;
      re[a + 1] = r1 + i3; // (r3 + i i3)(-i) = i3 - i r3
      im[a + 1] = i1 - r3;
      re[a + 3] = r1 - i3;
      im[a + 3] = i1 + r3;
    }
    h = 4;
  }
  const cos = plan.cos;
  const sin = plan.sin;
  for (; 4 * h <= n; h *= 4) quadPass(re, im, offset, end, h, cos, sin);
  if (h < n) pairPass(re, im, offset, end, h, cos, sin);
}

/** Stages h and 2h of the radix-2 transform fused: groups of 4h, points k, k+h, k+2h, k+3h. */
function quadPass(
  re: Float64Array,
  im: Float64Array,
  offset: number,
  end: number,
  h: number,
  cos: Float64Array,
  sin: Float64Array,
): void {
  for (let start = offset; start < end; start += 4 * h) {
    for (let k = 0; k < h; k++) {
      const w1r = cos[h + k];
      const w1i = sin[h + k];
      const w2r = cos[2 * h + k];
      const w2i = sin[2 * h + k];
      const a0 = start + k;
      const a1 = a0 + h;
      const a2 = a1 + h;
      const a3 = a2 + h;
      // stage h: (a0, a1) and (a2, a3) with twiddle w1
      let tr = w1r * re[a1] - w1i * im[a1];
      let ti = w1r * im[a1] + w1i * re[a1];
      const y0r = re[a0] + tr;
      const y0i = im[a0] + ti;
      const y1r = re[a0] - tr;
      const y1i = im[a0] - ti;
      tr = w1r * re[a3] - w1i * im[a3];
      ti = w1r * im[a3] + w1i * re[a3];
      const y2r = re[a2] + tr;
      const y2i = im[a2] + ti;
      const y3r = re[a2] - tr;
      const y3i = im[a2] - ti;
      // stage 2h: (a0, a2) with w2, (a1, a3) with w2 times -i
      const ur = w2r * y2r - w2i * y2i;
      const ui = w2r * y2i + w2i * y2r;
      const vr = w2r * y3i + w2i * y3r;
      const vi = -(w2r * y3r - w2i * y3i);
      re[a0] = y0r + ur;
      im[a0] = y0i + ui;
      re[a2] = y0r - ur;
      im[a2] = y0i - ui;
      re[a1] = y1r + vr;
      im[a1] = y1i + vi;
      re[a3] = y1r - vr;
      im[a3] = y1i - vi;
    }
  }
}

/** One radix-2 stage of half-size h. */
function pairPass(
  re: Float64Array,
  im: Float64Array,
  offset: number,
  end: number,
  h: number,
  cos: Float64Array,
  sin: Float64Array,
): void {
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
