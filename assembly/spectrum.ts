// AssemblyScript source of the optional SIMD 2-D FFT of the spectrum analysis (compiled by
// scripts/build-simd.ts into src/core/spectrum/wasm-bytes.ts). The f64x2 twin of
// fft2dBitReversed in src/core/spectrum/fft2d.ts, which stays the reference: the same
// radix-2^2 stages, twiddles and operations per element in the same order (f64x2 add, sub and
// mul round as the scalar ones do, and nothing fuses), so the values are the same bit for bit.
// Arrays are byte addresses of f64s in the imported memory. In place; allocates nothing.

@inline function at(base: usize, index: i32): usize {
  return base + (<usize>index << 3);
}

/**
 * Stages h and 2h of one radix-2^2 butterfly on two lanes: points at byte offsets o0..o3 of
 * (re, im), twiddles w1 and w2 (w2 times -i for the second pair), as fft.ts's quadPass.
 */
@inline function quad(re: usize, im: usize, o0: usize, o1: usize, o2: usize, o3: usize, w1r: v128, w1i: v128, w2r: v128, w2i: v128): void {
  const r1 = v128.load(re + o1);
  const i1 = v128.load(im + o1);
  let tr = f64x2.sub(f64x2.mul(w1r, r1), f64x2.mul(w1i, i1));
  let ti = f64x2.add(f64x2.mul(w1r, i1), f64x2.mul(w1i, r1));
  const r0 = v128.load(re + o0);
  const i0 = v128.load(im + o0);
  const y0r = f64x2.add(r0, tr);
  const y0i = f64x2.add(i0, ti);
  const y1r = f64x2.sub(r0, tr);
  const y1i = f64x2.sub(i0, ti);
  const r3 = v128.load(re + o3);
  const i3 = v128.load(im + o3);
  tr = f64x2.sub(f64x2.mul(w1r, r3), f64x2.mul(w1i, i3));
  ti = f64x2.add(f64x2.mul(w1r, i3), f64x2.mul(w1i, r3));
  const r2 = v128.load(re + o2);
  const i2 = v128.load(im + o2);
  const y2r = f64x2.add(r2, tr);
  const y2i = f64x2.add(i2, ti);
  const y3r = f64x2.sub(r2, tr);
  const y3i = f64x2.sub(i2, ti);
  const ur = f64x2.sub(f64x2.mul(w2r, y2r), f64x2.mul(w2i, y2i));
  const ui = f64x2.add(f64x2.mul(w2r, y2i), f64x2.mul(w2i, y2r));
  const vr = f64x2.add(f64x2.mul(w2r, y3i), f64x2.mul(w2i, y3r));
  const vi = f64x2.neg(f64x2.sub(f64x2.mul(w2r, y3r), f64x2.mul(w2i, y3i)));
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
  const tr = f64x2.sub(f64x2.mul(wr, br), f64x2.mul(wi, bi));
  const ti = f64x2.add(f64x2.mul(wr, bi), f64x2.mul(wi, br));
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

/**
 * luminance.ts's windowedTileLuminance for 8-bit RGB (channels 3) or RGBA (4) samples: the
 * size x size tile packed at `src` (rows of size * channels bytes), through `lut` (three tables
 * of 256 f64: each primary's coefficient times the linear value of each code, the same
 * products the scalar loop forms), times the window `w2`, to out[rev[y] * size + rev[x]].
 * Returns the sum of the values written, added in the scalar loop's order. Not in place.
 */
export function tileLuminance8(out: usize, src: usize, channels: i32, size: i32, lut: usize, w2: usize, rev: usize, alphaScale: f64): f64 {
  let sum = 0.0;
  let p = src;
  const g = lut + 2048;
  const b = lut + 4096;
  for (let y = 0; y < size; y++) {
    const row = w2 + (<usize>(y * size) << 3);
    const dst = out + (<usize>(load<u32>(rev + (<usize>y << 2)) * <u32>size) << 3);
    if (channels == 3) {
      for (let x = 0; x < size; x++, p += 3) {
        const l = load<f64>(lut + (<usize>load<u8>(p) << 3)) + load<f64>(g + (<usize>load<u8>(p, 1) << 3)) + load<f64>(b + (<usize>load<u8>(p, 2) << 3));
        const v = l * load<f64>(row + (<usize>x << 3));
        store<f64>(dst + (<usize>load<u32>(rev + (<usize>x << 2)) << 3), v);
        sum += v;
      }
    } else {
      for (let x = 0; x < size; x++, p += 4) {
        const l = load<f64>(lut + (<usize>load<u8>(p) << 3)) + load<f64>(g + (<usize>load<u8>(p, 1) << 3)) + load<f64>(b + (<usize>load<u8>(p, 2) << 3));
        const v = l * <f64>load<u8>(p, 3) * alphaScale * load<f64>(row + (<usize>x << 3));
        store<f64>(dst + (<usize>load<u32>(rev + (<usize>x << 2)) << 3), v);
        sum += v;
      }
    }
  }
  return sum;
}

@inline function addTo(base: usize, index: i32, v: f64): void {
  const p = at(base, index);
  store<f64>(p, load<f64>(p) + v);
}

/**
 * periodogram.ts's accumulatePacked, the same operations in the same order: the powers of the
 * two real tiles packed in the natural-order transform (re, im) of side t, times norm, added
 * to `power` (centred, t x t) and to the region sums at `regionPower` (regions of bins x bins
 * cells from baseA, and from baseB unless it is -1). Reads re/im, writes only the sinks.
 */
export function accumulatePacked(re: usize, im: usize, t: i32, norm: f64, power: usize, regionPower: usize, bins: i32, shift: i32, baseA: i32, baseB: i32): void {
  const mask = t - 1;
  const half = t >> 1;
  for (let v = 0; v <= half; v++) {
    const mirror = v != 0 && v != half;
    const rowNeg = ((t - v) & mask) * t;
    const vc = (v + half) & mask;
    const vn = (half - v) & mask;
    const outRow = vc * t;
    const outNeg = vn * t;
    const cellRow = (vc >> shift) * bins;
    const cellNeg = (vn >> shift) * bins;
    for (let u = 0; u < t; u++) {
      const i = v * t + u;
      const j = rowNeg + ((t - u) & mask);
      const ri = load<f64>(at(re, i));
      const rj = load<f64>(at(re, j));
      const ii = load<f64>(at(im, i));
      const ij = load<f64>(at(im, j));
      const sr = ri + rj;
      const di = ii - ij;
      const dr = ri - rj;
      const si = ii + ij;
      const pa = (sr * sr + di * di) * norm;
      const pb = (dr * dr + si * si) * norm;
      const uc = (u + half) & mask;
      addTo(power, outRow + uc, pa + pb);
      const cell = cellRow + (uc >> shift);
      addTo(regionPower, baseA + cell, pa);
      if (baseB >= 0) addTo(regionPower, baseB + cell, pb);
      if (mirror) {
        const un = (half - u) & mask;
        addTo(power, outNeg + un, pa + pb);
        const neg = cellNeg + (un >> shift);
        addTo(regionPower, baseA + neg, pa);
        if (baseB >= 0) addTo(regionPower, baseB + neg, pb);
      }
    }
  }
}
