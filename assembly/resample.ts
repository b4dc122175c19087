// AssemblyScript source of the optional SIMD resampling kernels (compiled by
// scripts/build-simd.ts into src/core/simd/bytes.ts). Each function is the f32x4 twin of a
// loop in src/core/resample/separable.ts, which stays the reference: same arguments as there,
// with every array given as a byte address in the imported memory and element offsets as i32.
// Out of place; allocates nothing. Reads up to 3 floats past a pixel's last sample (the arena
// pads every buffer).

@inline function addr(base: i32, index: i32): usize {
  return <usize>(base + (index << 2));
}

/** Many lanes: dst row = sum_k w_k * src row (start + k), four taps per pass, f32x4 over lanes. */
export function across(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, srcBase: i32, srcStep: i32,
  lanes: i32, taps: i32, start: i32, weights: i32, o0: i32, o1: i32,
): void {
  const vec = lanes & ~3;
  for (let o = o0; o < o1; o++) {
    const d = addr(dst, dstBase + o * dstStep);
    const row = addr(weights, o * taps);
    const s = addr(src, srcBase + load<i32>(addr(start, o)) * srcStep);
    const sb = <usize>(srcStep << 2);
    const w0 = load<f32>(row);
    const v0 = f32x4.splat(w0);
    for (let i = 0; i < vec; i += 4) {
      const j = <usize>(i << 2);
      v128.store(d + j, f32x4.mul(v0, v128.load(s + j)));
    }
    for (let i = vec; i < lanes; i++) {
      const j = <usize>(i << 2);
      store<f32>(d + j, w0 * load<f32>(s + j));
    }
    let k = 1;
    for (; k + 8 <= taps; k += 8) {
      const r = row + (<usize>k << 2);
      const b0 = v128.load32_splat(r), b1 = v128.load32_splat(r + 4), b2 = v128.load32_splat(r + 8), b3 = v128.load32_splat(r + 12);
      const b4 = v128.load32_splat(r + 16), b5 = v128.load32_splat(r + 20), b6 = v128.load32_splat(r + 24), b7 = v128.load32_splat(r + 28);
      const x0 = s + <usize>k * sb;
      for (let i = 0; i < vec; i += 4) {
        const j = <usize>(i << 2);
        const x = x0 + j;
        let acc = v128.load(d + j);
        acc = f32x4.add(acc, f32x4.mul(b0, v128.load(x)));
        acc = f32x4.add(acc, f32x4.mul(b1, v128.load(x + sb)));
        acc = f32x4.add(acc, f32x4.mul(b2, v128.load(x + 2 * sb)));
        acc = f32x4.add(acc, f32x4.mul(b3, v128.load(x + 3 * sb)));
        acc = f32x4.add(acc, f32x4.mul(b4, v128.load(x + 4 * sb)));
        acc = f32x4.add(acc, f32x4.mul(b5, v128.load(x + 5 * sb)));
        acc = f32x4.add(acc, f32x4.mul(b6, v128.load(x + 6 * sb)));
        acc = f32x4.add(acc, f32x4.mul(b7, v128.load(x + 7 * sb)));
        v128.store(d + j, acc);
      }
      for (let i = vec; i < lanes; i++) {
        const j = <usize>(i << 2);
        let acc = load<f32>(d + j);
        for (let t = 0; t < 8; t++) acc += load<f32>(r + (<usize>t << 2)) * load<f32>(x0 + <usize>t * sb + j);
        store<f32>(d + j, acc);
      }
    }
    for (; k + 4 <= taps; k += 4) {
      const a0 = load<f32>(row + (<usize>k << 2));
      const a1 = load<f32>(row + (<usize>(k + 1) << 2));
      const a2 = load<f32>(row + (<usize>(k + 2) << 2));
      const a3 = load<f32>(row + (<usize>(k + 3) << 2));
      const x0 = s + <usize>k * sb;
      const x1 = x0 + sb;
      const x2 = x1 + sb;
      const x3 = x2 + sb;
      const b0 = f32x4.splat(a0), b1 = f32x4.splat(a1), b2 = f32x4.splat(a2), b3 = f32x4.splat(a3);
      for (let i = 0; i < vec; i += 4) {
        const j = <usize>(i << 2);
        let acc = v128.load(d + j);
        acc = f32x4.add(acc, f32x4.mul(b0, v128.load(x0 + j)));
        acc = f32x4.add(acc, f32x4.mul(b1, v128.load(x1 + j)));
        acc = f32x4.add(acc, f32x4.mul(b2, v128.load(x2 + j)));
        acc = f32x4.add(acc, f32x4.mul(b3, v128.load(x3 + j)));
        v128.store(d + j, acc);
      }
      for (let i = vec; i < lanes; i++) {
        const j = <usize>(i << 2);
        store<f32>(d + j, load<f32>(d + j) + a0 * load<f32>(x0 + j) + a1 * load<f32>(x1 + j) + a2 * load<f32>(x2 + j) + a3 * load<f32>(x3 + j));
      }
    }
    for (; k < taps; k++) {
      const a = load<f32>(row + (<usize>k << 2));
      const x = s + <usize>k * sb;
      const b = f32x4.splat(a);
      for (let i = 0; i < vec; i += 4) {
        const j = <usize>(i << 2);
        v128.store(d + j, f32x4.add(v128.load(d + j), f32x4.mul(b, v128.load(x + j))));
      }
      for (let i = vec; i < lanes; i++) {
        const j = <usize>(i << 2);
        store<f32>(d + j, load<f32>(d + j) + a * load<f32>(x + j));
      }
    }
  }
}

/**
 * Interior output rows of the pyramid's symmetric 5-tap reduce down columns (many lanes):
 * dst row o = a r(2o) + b (r(2o - 1) + r(2o + 1)) + c (r(2o - 2) + r(2o + 2)), f32x4 over lanes,
 * each output row read and written once (the general across pass reads it back per 4 taps).
 */
export function across5(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, srcBase: i32, srcStep: i32,
  lanes: i32, a: f32, b: f32, c: f32, o0: i32, o1: i32,
): void {
  const vec = lanes & ~3;
  const sb = <usize>(srcStep << 2);
  const va = f32x4.splat(a), vb = f32x4.splat(b), vc = f32x4.splat(c);
  for (let o = o0; o < o1; o++) {
    const d = addr(dst, dstBase + o * dstStep);
    const x0 = addr(src, srcBase + (2 * o - 2) * srcStep);
    const x1 = x0 + sb, x2 = x1 + sb, x3 = x2 + sb, x4 = x3 + sb;
    for (let i = 0; i < vec; i += 4) {
      const j = <usize>(i << 2);
      v128.store(d + j, symmetric5(va, vb, vc, v128.load(x0 + j), v128.load(x1 + j), v128.load(x2 + j), v128.load(x3 + j), v128.load(x4 + j)));
    }
    for (let i = vec; i < lanes; i++) {
      const j = <usize>(i << 2);
      store<f32>(d + j, a * load<f32>(x2 + j) + b * (load<f32>(x1 + j) + load<f32>(x3 + j)) + c * (load<f32>(x0 + j) + load<f32>(x4 + j)));
    }
  }
}

/**
 * Outputs before this one may be stored as a whole f32x4: with pixels packed (dstStep = lanes)
 * the lanes past a pixel land on the next 3 / lanes pixels, which the loop writes afterwards.
 */
@inline function wideBefore(dstStep: i32, lanes: i32, o1: i32): i32 {
  return dstStep == lanes ? o1 - 3 / lanes : -2147483648;
}

@inline function storeLanes(d: usize, acc: v128, lanes: i32): void {
  store<f32>(d, f32x4.extract_lane(acc, 0));
  if (lanes > 1) store<f32>(d + 4, f32x4.extract_lane(acc, 1));
  if (lanes > 2) store<f32>(d + 8, f32x4.extract_lane(acc, 2));
  if (lanes > 3) store<f32>(d + 12, f32x4.extract_lane(acc, 3));
}

/** A packed pixel stored whole (see wideBefore) or lane by lane. */
@inline function storePixel(d: usize, acc: v128, whole: bool, lanes: i32): void {
  if (whole) v128.store(d, acc);
  else storeLanes(d, acc, lanes);
}

/** The pyramid's symmetric 5-tap sum a x2 + b (x1 + x3) + c (x0 + x4), f32x4. */
@inline function symmetric5(va: v128, vb: v128, vc: v128, x0: v128, x1: v128, x2: v128, x3: v128, x4: v128): v128 {
  return f32x4.add(f32x4.add(f32x4.mul(va, x2), f32x4.mul(vb, f32x4.add(x1, x3))), f32x4.mul(vc, f32x4.add(x0, x4)));
}

/**
 * Pixels of 1..4 interleaved samples: f32x4 accumulators hold every lane of a pixel; four of
 * them take alternate taps so the additions do not wait on each other.
 */
export function pixels(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, srcBase: i32, srcStep: i32,
  lanes: i32, taps: i32, start: i32, weights: i32, o0: i32, o1: i32,
): void {
  const sb = <usize>(srcStep << 2);
  const wide = wideBefore(dstStep, lanes, o1);
  for (let o = o0; o < o1; o++) {
    const row = addr(weights, o * taps);
    let s = addr(src, srcBase + load<i32>(addr(start, o)) * srcStep);
    let acc0 = f32x4.splat(0), acc1 = f32x4.splat(0), acc2 = f32x4.splat(0), acc3 = f32x4.splat(0);
    let k = 0;
    for (; k + 4 <= taps; k += 4, s += 4 * sb) {
      const r = row + (<usize>k << 2);
      acc0 = f32x4.add(acc0, f32x4.mul(v128.load32_splat(r), v128.load(s)));
      acc1 = f32x4.add(acc1, f32x4.mul(v128.load32_splat(r + 4), v128.load(s + sb)));
      acc2 = f32x4.add(acc2, f32x4.mul(v128.load32_splat(r + 8), v128.load(s + 2 * sb)));
      acc3 = f32x4.add(acc3, f32x4.mul(v128.load32_splat(r + 12), v128.load(s + 3 * sb)));
    }
    for (; k < taps; k++, s += sb) {
      acc0 = f32x4.add(acc0, f32x4.mul(f32x4.splat(load<f32>(row + (<usize>k << 2))), v128.load(s)));
    }
    const sum = f32x4.add(f32x4.add(acc0, acc1), f32x4.add(acc2, acc3));
    storePixel(addr(dst, dstBase + o * dstStep), sum, o < wide, lanes);
  }
}

/**
 * Interior rows of the pyramid's symmetric 5-tap reduce: a x0 + b (x-1 + x1) + c (x-2 + x2).
 * Output o reads inputs 2o - 2 .. 2o + 2, so the last three of them are the next output's first
 * three: two new loads per output.
 */
export function reduce5(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, srcBase: i32, srcStep: i32,
  lanes: i32, a: f32, b: f32, c: f32, o0: i32, o1: i32,
): void {
  if (o0 >= o1) return;
  const sb = <usize>(srcStep << 2);
  const db = <usize>(dstStep << 2);
  const wide = wideBefore(dstStep, lanes, o1);
  const va = f32x4.splat(a), vb = f32x4.splat(b), vc = f32x4.splat(c);
  let s = addr(src, srcBase + (2 * o0 - 2) * srcStep);
  let d = addr(dst, dstBase + o0 * dstStep);
  let x0 = v128.load(s), x1 = v128.load(s + sb), x2 = v128.load(s + 2 * sb);
  for (let o = o0; o < o1; o++, s += 2 * sb, d += db) {
    const x3 = v128.load(s + 3 * sb), x4 = v128.load(s + 4 * sb);
    storePixel(d, symmetric5(va, vb, vc, x0, x1, x2, x3, x4), o < wide, lanes);
    x0 = x2;
    x1 = x3;
    x2 = x4;
  }
}

/** One pixel of 1..4 8-bit codes at src as working floats through the table at lut. */
@inline function decodePixel(src: usize, lut: usize, lanes: i32): v128 {
  let v = f32x4.splat(load<f32>(lut + (<usize>load<u8>(src) << 2)));
  if (lanes > 1) v = f32x4.replace_lane(v, 1, load<f32>(lut + (<usize>load<u8>(src + 1) << 2)));
  if (lanes > 2) v = f32x4.replace_lane(v, 2, load<f32>(lut + (<usize>load<u8>(src + 2) << 2)));
  if (lanes > 3) v = f32x4.replace_lane(v, 3, load<f32>(lut + (<usize>load<u8>(src + 3) << 2)));
  return v;
}

/**
 * decode8 and reduce5 in one pass over a row of 8-bit pixels (lanes codes each, packed at
 * src): interior outputs o0..o1 of the pyramid's reduce, each input pixel decoded through the
 * table at lut straight into a register, so the decoded row is never stored. Same sums in the
 * same order as decode8 then reduce5. Every code goes through the 256-entry table (1 KB, in the
 * first-level cache): a table of code pairs (512 KB) halved the reads but missed the caches on
 * varied pictures: renders with a pyramid level took 7-16 % longer with it (issue 15).
 */
export function decodeReduce5(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, lut: i32,
  lanes: i32, a: f32, b: f32, c: f32, o0: i32, o1: i32,
): void {
  if (o0 >= o1) return;
  const db = <usize>(dstStep << 2);
  const wide = wideBefore(dstStep, lanes, o1);
  const va = f32x4.splat(a), vb = f32x4.splat(b), vc = f32x4.splat(c);
  const t = <usize>lut;
  const sb = <usize>lanes;
  let s = <usize>(src + (2 * o0 - 2) * lanes);
  let d = addr(dst, dstBase + o0 * dstStep);
  let x0 = decodePixel(s, t, lanes), x1 = decodePixel(s + sb, t, lanes), x2 = decodePixel(s + 2 * sb, t, lanes);
  for (let o = o0; o < o1; o++, s += 2 * sb, d += db) {
    const x3 = decodePixel(s + 3 * sb, t, lanes);
    const x4 = decodePixel(s + 4 * sb, t, lanes);
    storePixel(d, symmetric5(va, vb, vc, x0, x1, x2, x3, x4), o < wide, lanes);
    x0 = x2;
    x1 = x3;
    x2 = x4;
  }
}

/** n 8-bit codes at src to working floats at dst through the 256-entry table at lut. */
export function decode8(dst: i32, src: i32, lut: i32, n: i32): void {
  const t = <usize>lut;
  let i = 0;
  for (; i + 4 <= n; i += 4) {
    // Four codes in one load (little-endian: the first code is the low byte).
    const c = load<u32>(<usize>(src + i));
    const d = <usize>(dst + (i << 2));
    store<f32>(d, load<f32>(t + (<usize>(c & 255) << 2)));
    store<f32>(d + 4, load<f32>(t + <usize>((c >> 6) & 0x3fc)));
    store<f32>(d + 8, load<f32>(t + <usize>((c >> 14) & 0x3fc)));
    store<f32>(d + 12, load<f32>(t + <usize>((c >> 22) & 0x3fc)));
  }
  for (; i < n; i++) {
    store<f32>(<usize>(dst + (i << 2)), load<f32>(<usize>(lut + (<i32>load<u8>(<usize>(src + i)) << 2))));
  }
}

/** n 16-bit codes at src to working floats at dst through the 65536-entry table at lut. */
export function decode16(dst: i32, src: i32, lut: i32, n: i32): void {
  for (let i = 0; i < n; i++) {
    store<f32>(<usize>(dst + (i << 2)), load<f32>(<usize>(lut + (<i32>load<u16>(<usize>(src + (i << 1))) << 2))));
  }
}

/**
 * n working floats at src to 8-bit sRGB codes at dst, the twin of quantiseRun in
 * src/core/color/encoder.ts with the bucket tables of src/core/color/bit-buckets.ts: a value's
 * float32 bits, shifted, pick a bucket whose first code (start, u8) is at most one threshold
 * (thresholds, f32, the last +Infinity) below the answer. Values >= 1 are taken as the largest
 * float32 below 1 (code 255); NaN and values <= 0 give 0. No branch but the loop's exit.
 */
export function quantise8(dst: i32, src: i32, n: i32, thresholds: i32, start: i32, shift: i32, base: i32): void {
  const vec = n & ~3;
  const nan = i32x4.splat(0x7f800000), top = i32x4.splat(0x3f7fffff), zero = i32x4.splat(0), vb = i32x4.splat(base);
  for (let i = 0; i < vec; i += 4) {
    const x = v128.load(<usize>(src + (i << 2)));
    const u = i32x4.min_s(i32x4.max_s(v128.andnot(x, i32x4.gt_s(x, nan)), zero), top);
    const b = i32x4.max_s(i32x4.sub(i32x4.shr_s(u, shift), vb), zero);
    const c0 = <i32>load<u8>(<usize>(start + i32x4.extract_lane(b, 0)));
    const c1 = <i32>load<u8>(<usize>(start + i32x4.extract_lane(b, 1)));
    const c2 = <i32>load<u8>(<usize>(start + i32x4.extract_lane(b, 2)));
    const c3 = <i32>load<u8>(<usize>(start + i32x4.extract_lane(b, 3)));
    let t = f32x4.splat(load<f32>(<usize>(thresholds + (c0 << 2))));
    t = f32x4.replace_lane(t, 1, load<f32>(<usize>(thresholds + (c1 << 2))));
    t = f32x4.replace_lane(t, 2, load<f32>(<usize>(thresholds + (c2 << 2))));
    t = f32x4.replace_lane(t, 3, load<f32>(<usize>(thresholds + (c3 << 2))));
    let c = i32x4.splat(c0);
    c = i32x4.replace_lane(c, 1, c1);
    c = i32x4.replace_lane(c, 2, c2);
    c = i32x4.replace_lane(c, 3, c3);
    c = i32x4.sub(c, f32x4.ge(u, t));
    const bytes = i8x16.narrow_i16x8_u(i16x8.narrow_i32x4_u(c, c), zero);
    v128.store32_lane(<usize>(dst + i), bytes, 0);
  }
  for (let i = vec; i < n; i++) {
    const x = load<i32>(<usize>(src + (i << 2)));
    const u = min<i32>(max<i32>(select<i32>(0, x, x > 0x7f800000), 0), 0x3f7fffff);
    const v = reinterpret<f32>(u);
    let code = <i32>load<u8>(<usize>(start + max<i32>((u >> shift) - base, 0)));
    code += <i32>(v >= load<f32>(<usize>(thresholds + (code << 2))));
    store<u8>(<usize>(dst + i), code);
  }
}

/**
 * The ringing limiter (src/core/resample/limit.ts): each output sample is clamped to the range
 * [lo, hi] of the inputs under its central lobe, widened above by `slack` times hi - lo, or
 * `crest` times it where both end samples lie below hi (a crest inside the lobe, not an edge's
 * plateau); below likewise, but by at most `floorShare` times lo, so a dark ground stays its
 * own colour. lobe = [first input, count] per output (i32 pairs).
 * f32x4 pmin and pmax over lanes (one instruction each; min and max carry NaN and -0 rules
 * that cost several), so no branch depends on the data. Pixels are stored lane by
 * lane: a whole-vector store would clamp the next pixel's lanes with this pixel's range.
 */
@inline function clampTo(v: v128, lo: v128, hi: v128, a: v128, b: v128, vs: v128, vc: v128, vf: v128): v128 {
  const span = f32x4.sub(hi, lo);
  const up = f32x4.mul(v128.bitselect(vc, vs, f32x4.lt(f32x4.pmax(a, b), hi)), span);
  const down = f32x4.mul(v128.bitselect(vc, vs, f32x4.gt(f32x4.pmin(a, b), lo)), span);
  const below = f32x4.sub(lo, f32x4.pmin(down, f32x4.mul(vf, lo)));
  return f32x4.pmin(f32x4.add(hi, up), f32x4.pmax(below, v));
}

export function limit(
  dst: i32, dstBase: i32, dstStep: i32, src: i32, srcBase: i32, srcStep: i32,
  lanes: i32, lobe: i32, o0: i32, o1: i32, slack: f32, crest: f32, floorShare: f32,
): void {
  const sb = <usize>(srcStep << 2);
  const vec = lanes > 4 ? lanes & ~3 : 0;
  const vs = f32x4.splat(slack);
  const vc = f32x4.splat(crest);
  const vf = f32x4.splat(floorShare);
  for (let o = o0; o < o1; o++) {
    const first = load<i32>(addr(lobe, 2 * o));
    const n = load<i32>(addr(lobe, 2 * o + 1));
    const d = addr(dst, dstBase + o * dstStep);
    const s = addr(src, srcBase + first * srcStep);
    const end = <usize>(n - 1) * sb;
    if (lanes <= 4) {
      const a = v128.load(s), b = v128.load(s + end);
      let lo = f32x4.pmin(a, b), hi = f32x4.pmax(a, b);
      for (let k = 1; k < n - 1; k++) {
        const x = v128.load(s + <usize>k * sb);
        lo = f32x4.pmin(lo, x);
        hi = f32x4.pmax(hi, x);
      }
      storeLanes(d, clampTo(v128.load(d), lo, hi, a, b, vs, vc, vf), lanes);
      continue;
    }
    for (let i = 0; i < vec; i += 4) {
      const j = <usize>(i << 2);
      const a = v128.load(s + j), b = v128.load(s + end + j);
      let lo = f32x4.pmin(a, b), hi = f32x4.pmax(a, b);
      for (let k = 1; k < n - 1; k++) {
        const x = v128.load(s + <usize>k * sb + j);
        lo = f32x4.pmin(lo, x);
        hi = f32x4.pmax(hi, x);
      }
      v128.store(d + j, clampTo(v128.load(d + j), lo, hi, a, b, vs, vc, vf));
    }
    for (let i = vec; i < lanes; i++) {
      const j = <usize>(i << 2);
      const a = load<f32>(s + j), b = load<f32>(s + end + j);
      let lo = b < a ? b : a, hi = a < b ? b : a;
      for (let k = 1; k < n - 1; k++) {
        const x = load<f32>(s + <usize>k * sb + j);
        lo = x < lo ? x : lo;
        hi = hi < x ? x : hi;
      }
      const span = hi - lo;
      const up = ((a < b ? b : a) < hi ? crest : slack) * span;
      const down = ((b < a ? b : a) > lo ? crest : slack) * span;
      const own = floorShare * lo;
      const v = load<f32>(d + j);
      const below = lo - (own < down ? own : down);
      const ceil = hi + up;
      store<f32>(d + j, v < below ? below : v > ceil ? ceil : v);
    }
  }
}
