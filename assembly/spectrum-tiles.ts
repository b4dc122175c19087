// The spectrum analysis's per-tile Wasm loops (exported through assembly/spectrum.ts): twins of
// luminance.ts's windowedTileLuminance and periodogram.ts's accumulatePacked, which stay the
// reference; the same operations in the same order, so the same values bit for bit.

@inline function at(base: usize, index: i32): usize {
  return base + (<usize>index << 3);
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
