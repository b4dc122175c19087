/**
 * Peaks of the source spectrum beyond the new Nyquist: where the folded energy comes from and
 * what it turns into. A sharp peak (a grating, a weave, a stripe) folds into a moiré at one
 * frequency; broadband energy (grain, noise, edges) folds into noise-like jaggies.
 */
import { aliasFrequency, type AxisResponse } from './model.js';

export interface RiskPeak {
  /** Source frequency, cycles per source pixel (fy >= 0 half plane). */
  fx: number;
  fy: number;
  /** Share of the non-DC energy in this peak (both conjugate lobes). */
  power: number;
  kind: 'periodic' | 'broadband';
  /** Where it lands, cycles per output pixel per axis: |s f - round(s f)|. */
  aliasTo: { fx: number; fy: number };
  /** Share of its power the planned filter lets through, |Hx Hy|^2. */
  passed: number;
}

/** At most this many peaks are reported. */
const MAX_PEAKS = 5;
/** Peaks holding less of the energy than this are not worth naming (common practice: -30 dB). */
const MIN_SHARE = 1e-3;
/**
 * A peak is periodic when it stands this far above the median of its surroundings (cells 3..4
 * bins away, outside the Hann main lobe of +-2 bins, whose side lobes are below -31 dB: Harris
 * 1978). 20 (13 dB) is common practice for calling a spectral line; Welch-averaged noise
 * stays within a few dB of its median.
 */
const LINE_RATIO = 20;

export interface PeakInput {
  power: Float32Array;
  size: number;
  total: number;
  scale: { x: number; y: number };
  nyquist: { x: number; y: number };
  hx: AxisResponse;
  hy: AxisResponse;
  /**
   * Peaks inside `inner` times the Nyquist rectangle are skipped (default 1: only what lies
   * beyond the new Nyquist); the visibility model asks for 0.5 to see beats and clean lines too.
   */
  inner?: number;
  /** Most peaks returned (default MAX_PEAKS). */
  max?: number;
}

/** Log-parabolic sub-bin offset of a peak from its two neighbours (common practice). */
function refine(left: number, centre: number, right: number): number {
  const a = Math.log(left + 1e-30);
  const b = Math.log(centre + 1e-30);
  const c = Math.log(right + 1e-30);
  const d = a - 2 * b + c;
  return d < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / d)) : 0;
}

/** The strongest peaks beyond (inner times) the Nyquist rectangle, strongest first. */
export function findPeaks(input: PeakInput): RiskPeak[] {
  const { power, size: n, total, scale } = input;
  const inner = input.inner ?? 1;
  const nyquist = { x: inner * input.nyquist.x, y: inner * input.nyquist.y };
  if (!(total > 0) || n < 8) return [];
  const at = (i: number, j: number) => power[((j + n) % n) * n + ((i + n) % n)];
  const ring: number[] = [];
  const found: RiskPeak[] = [];
  const h = n / 2;
  // Each conjugate pair once: the rows 0 < fy < 0.5 whole, and on the rows that are their own
  // conjugates (fy = 0, and fy = 0.5, stored in row 0 and visited as j = n) fx > 0 and the
  // cell fx = -0.5 (which is +0.5), so 1-px stripes (the source's own Nyquist) are seen too.
  for (let j = h; j <= n; j++) {
    const edgeRow = j === h || j === n;
    for (let i = 0; i < n; i++) {
      if (edgeRow && i !== 0 && (i < h || (i === h && j === h))) continue;
      const fx = (i - h) / n;
      const fy = (j - h) / n;
      if (Math.abs(fx) <= nyquist.x && Math.abs(fy) <= nyquist.y) continue;
      const p = at(i, j);
      let lobe = 0;
      let isMax = true;
      for (let dj = -1; dj <= 1 && isMax; dj++) {
        for (let di = -1; di <= 1; di++) {
          const q = at(i + di, j + dj);
          if (q > p) isMax = false;
          lobe += q;
        }
      }
      // A cell on both Nyquist-or-zero lines is its own conjugate: its lobe is counted once.
      const share = ((edgeRow && (i === 0 || i === h) ? 1 : 2) * lobe) / total;
      if (!isMax || share < MIN_SHARE) continue;
      ring.length = 0;
      for (let dj = -4; dj <= 4; dj++) {
        for (let di = -4; di <= 4; di++) {
          if (Math.max(Math.abs(di), Math.abs(dj)) >= 3) ring.push(at(i + di, j + dj));
        }
      }
      ring.sort((a, b) => a - b);
      const median = ring[ring.length >> 1];
      const px = fx + refine(at(i - 1, j), p, at(i + 1, j)) / n;
      const py = fy + refine(at(i, j - 1), p, at(i, j + 1)) / n;
      const gain = input.hx(Math.abs(px)) * input.hy(Math.abs(py));
      found.push({
        fx: px,
        fy: py,
        power: share,
        kind: p > LINE_RATIO * median ? 'periodic' : 'broadband',
        aliasTo: { fx: aliasFrequency(scale.x, px), fy: aliasFrequency(scale.y, py) },
        passed: gain * gain,
      });
    }
  }
  found.sort((a, b) => b.power - a.power);
  return found.slice(0, input.max ?? MAX_PEAKS);
}
