// AssemblyScript source of the spectrum analysis's optional Wasm loops (compiled by
// scripts/build-simd.ts into src/core/spectrum/wasm-bytes.ts; the per-tile loops are in
// spectrum-tiles.ts). The f64x2 twin of
// fft2dBitReversed in src/core/spectrum/fft2d.ts, which stays the reference: the same
// radix-2^2 stages, twiddles and operations per element in the same order (f64x2 add, sub and
// mul round as the scalar ones do, and nothing fuses), so the values are the same bit for bit.
// Arrays are byte addresses of f64s in the imported memory. In place; allocates nothing.

@inline function at(base: usize, index: i32): usize {
  return base + (<usize>index << 3);
}

/** Real and imaginary parts of the product (wr + i wi)(r + i i) on two lanes, as fft.ts forms them. */
@inline function mulRe(wr: v128, wi: v128, r: v128, i: v128): v128 {
  return f64x2.sub(f64x2.mul(wr, r), f64x2.mul(wi, i));
}
@inline function mulIm(wr: v128, wi: v128, r: v128, i: v128): v128 {
  return f64x2.add(f64x2.mul(wr, i), f64x2.mul(wi, r));
}

/**
 * Stages h and 2h of one radix-2^2 butterfly on two lanes: points at byte offsets o0..o3 of
 * (re, im), twiddles w1 and w2 (w2 times -i for the second pair), as fft.ts's quadPass.
 */
@inline function quad(re: usize, im: usize, o0: usize, o1: usize, o2: usize, o3: usize, w1r: v128, w1i: v128, w2r: v128, w2i: v128): void {
  const r1 = v128.load(re + o1);
  const i1 = v128.load(im + o1);
  let tr = mulRe(w1r, w1i, r1, i1);
  let ti = mulIm(w1r, w1i, r1, i1);
  const r0 = v128.load(re + o0);
  const i0 = v128.load(im + o0);
  const y0r = f64x2.add(r0, tr);
  const y0i = f64x2.add(i0, ti);
  const y1r = f64x2.sub(r0, tr);
  const y1i = f64x2.sub(i0, ti);
  const r3 = v128.load(re + o3);
  const i3 = v128.load(im + o3);
  tr = mulRe(w1r, w1i, r3, i3);
  ti = mulIm(w1r, w1i, r3, i3);
  const r2 = v128.load(re + o2);
  const i2 = v128.load(im + o2);
  const y2r = f64x2.add(r2, tr);
  const y2i = f64x2.add(i2, ti);
  const y3r = f64x2.sub(r2, tr);
  const y3i = f64x2.sub(i2, ti);
  const ur = mulRe(w2r, w2i, y2r, y2i);
  const ui = mulIm(w2r, w2i, y2r, y2i);
  // w2 times -i for the second pair: (w2 y3) (-i) = Im(w2 y3) - i Re(w2 y3).
  const vr = mulIm(w2r, w2i, y3r, y3i);
  const vi = f64x2.neg(mulRe(w2r, w2i, y3r, y3i));
  v128.store(re + o0, f64x2.add(y0r, ur));
  v128.store(im + o0, f64x2.add(y0i, ui));
  v128.store(re + o2, f64x2.sub(y0r, ur));
  v128.store(im + o2, f64x2.sub(y0i, ui));
  v128.store(re + o1, f64x2.add(y1r, vr));
  v128.store(im + o1, f64x2.add(y1i, vi));
  v128.store(re + o3, f64x2.sub(y1r, vr));
  v128.store(im + o3, f64x2.sub(y1i, vi));
}

/** One radix-2 butterfly on two lanes (points at byte offsets a, b; twiddle w), as pairPass. */
@inline function pair(re: usize, im: usize, a: usize, b: usize, wr: v128, wi: v128): void {
  const br = v128.load(re + b);
  const bi = v128.load(im + b);
  const tr = mulRe(wr, wi, br, bi);
  const ti = mulIm(wr, wi, br, bi);
  const ar = v128.load(re + a);
  const ai = v128.load(im + a);
  v128.store(re + b, f64x2.sub(ar, tr));
  v128.store(im + b, f64x2.sub(ai, ti));
  v128.store(re + a, f64x2.add(ar, tr));
  v128.store(im + a, f64x2.add(ai, ti));
}

/** fft.ts's fftStages on the n samples at (re, im), bit-reversed in, natural order out (n >= 4). */
function rowStages(re: usize, im: usize, cos: usize, sin: usize, n: i32): void {
  for (let a = 0; a < n; a += 4) {
    const p = at(re, a);
    const q = at(im, a);
    const r0 = load<f64>(p) + load<f64>(p, 8);
    const i0 = load<f64>(q) + load<f64>(q, 8);
    const r1 = load<f64>(p) - load<f64>(p, 8);
    const i1 = load<f64>(q) - load<f64>(q, 8);
    const r2 = load<f64>(p, 16) + load<f64>(p, 24);
    const i2 = load<f64>(q, 16) + load<f64>(q, 24);
    const r3 = load<f64>(p, 16) - load<f64>(p, 24);
    const i3 = load<f64>(q, 16) - load<f64>(q, 24);
    store<f64>(p, r0 + r2);
    store<f64>(q, i0 + i2);
    store<f64>(p, r0 - r2, 16);
    store<f64>(q, i0 - i2, 16);
    store<f64>(p, r1 + i3, 8);
    store<f64>(q, i1 - r3, 8);
    store<f64>(p, r1 - i3, 24);
    store<f64>(q, i1 + r3, 24);
  }
  let h = 4;
  // Two consecutive k share a twiddle load (h >= 4 is even).
  for (; 4 * h <= n; h *= 4) {
    const hb = <usize>h << 3;
    for (let start = 0; start < n; start += 4 * h) {
      for (let k = 0; k < h; k += 2) {
        const o0 = <usize>(start + k) << 3;
        quad(re, im, o0, o0 + hb, o0 + 2 * hb, o0 + 3 * hb,
          v128.load(at(cos, h + k)), v128.load(at(sin, h + k)), v128.load(at(cos, 2 * h + k)), v128.load(at(sin, 2 * h + k)));
      }
    }
  }
  if (h < n) {
    const hb = <usize>h << 3;
    for (let k = 0; k < h; k += 2) {
      const o = <usize>k << 3;
      pair(re, im, o, o + hb, v128.load(at(cos, h + k)), v128.load(at(sin, h + k)));
    }
  }
}

/** fft2d.ts's column stages: every column of the n x n array at once, two columns per lane pair. */
function columns(re: usize, im: usize, cos: usize, sin: usize, n: i32): void {
  const rowBytes = <usize>n << 3;
  let h = 1;
  for (; 4 * h <= n; h *= 4) {
    const hb = <usize>h * rowBytes;
    for (let k = 0; k < h; k++) {
      const w1r = f64x2.splat(load<f64>(at(cos, h + k)));
      const w1i = f64x2.splat(load<f64>(at(sin, h + k)));
      const w2r = f64x2.splat(load<f64>(at(cos, 2 * h + k)));
      const w2i = f64x2.splat(load<f64>(at(sin, 2 * h + k)));
      for (let start = 0; start < n; start += 4 * h) {
        const base = <usize>(start + k) * rowBytes;
        for (let x: usize = 0; x < rowBytes; x += 16) {
          const o0 = base + x;
          quad(re, im, o0, o0 + hb, o0 + 2 * hb, o0 + 3 * hb, w1r, w1i, w2r, w2i);
        }
      }
    }
  }
  if (h < n) {
    const hb = <usize>h * rowBytes;
    for (let k = 0; k < h; k++) {
      const wr = f64x2.splat(load<f64>(at(cos, h + k)));
      const wi = f64x2.splat(load<f64>(at(sin, h + k)));
      for (let start = 0; start < n; start += 2 * h) {
        const base = <usize>(start + k) * rowBytes;
        for (let x: usize = 0; x < rowBytes; x += 16) pair(re, im, base + x, base + x + hb, wr, wi);
      }
    }
  }
}

/**
 * Forward 2-D FFT of the n x n complex array (re, im), stored bit-reversed on both axes, into
 * natural order, in place (fft2dBitReversed). n is a power of two >= 4; cos and sin hold the
 * FftPlan's per-stage twiddles (n entries each).
 */
export function fft2dBitReversed(re: usize, im: usize, cos: usize, sin: usize, n: i32): void {
  const rowBytes = <usize>n << 3;
  for (let r = 0; r < n; r++) rowStages(re + <usize>r * rowBytes, im + <usize>r * rowBytes, cos, sin, n);
  columns(re, im, cos, sin, n);
}

export { tileLuminance8, accumulatePacked } from './spectrum-tiles';
