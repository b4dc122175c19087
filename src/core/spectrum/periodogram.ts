/**
 * Power spectra of two real tiles transformed together as one complex array z = a + i b
 * (Brigham, E. O. (1974), "The Fast Fourier Transform", two real functions by one complex
 * FFT): A(k) = (Z(k) + conj Z(-k)) / 2, B(k) = (Z(k) - conj Z(-k)) / 2i. Real tiles have
 * |A(k)| = |A(-k)|, so only the half plane 0 <= v <= T/2 is computed and mirrored.
 */

/** Where the two tiles' powers go. */
export interface PowerSinks {
  /** Full-resolution sum over all tiles, centred order (cell (u, v) of frequency (u - T/2, v - T/2) / T). */
  power: Float64Array;
  /** Binned per-region sums, each region `bins` x `bins` cells of 2^shift x 2^shift full cells. */
  regionPower: Float64Array;
  bins: number;
  shift: number;
}

/**
 * Adds |A|^2 * norm and |B|^2 * norm of the natural-order transform (re, im) (side t) to the
 * sinks; tile A belongs to the region whose cells start at `baseA`, tile B at `baseB` (-1:
 * there is no tile B). Reads re/im, writes only the sinks; allocates nothing.
 */
export function accumulatePacked(
  re: Float64Array,
  im: Float64Array,
  t: number,
  norm: number,
  sinks: PowerSinks,
  baseA: number,
  baseB: number,
): void {
  const { power, regionPower, bins, shift } = sinks;
  const mask = t - 1;
  const half = t >> 1;
  for (let v = 0; v <= half; v++) {
    const mirror = v !== 0 && v !== half;
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
      const sr = re[i] + re[j];
      const di = im[i] - im[j];
      const dr = re[i] - re[j];
      const si = im[i] + im[j];
      const pa = (sr * sr + di * di) * norm;
      const pb = (dr * dr + si * si) * norm;
      const uc = (u + half) & mask;
      power[outRow + uc] += pa + pb;
      const cell = cellRow + (uc >> shift);
      regionPower[baseA + cell] += pa;
      if (baseB >= 0) regionPower[baseB + cell] += pb;
      if (mirror) {
        const un = (half - u) & mask;
        power[outNeg + un] += pa + pb;
        const neg = cellNeg + (un >> shift);
        regionPower[baseA + neg] += pa;
        if (baseB >= 0) regionPower[baseB + neg] += pb;
      }
    }
  }
}
