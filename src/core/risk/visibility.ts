/**
 * The visibility model: every false pattern a planned rendition would show, as a contrast at
 * the spatial frequency where the viewer sees it, against the contrast threshold there
 * (csf.ts). Two kinds of false pattern:
 * - fold: content above the new Nyquist that the filter passes lands at |s f - round(s f)|
 *   cycles per output pixel (Nyquist 1928; Shannon 1949);
 * - beat: a strong line between BEAT_LOW and 1 times the new Nyquist is not folded, but shown
 *   with square pixels it sums with its sampling image at 1 - u, and the stripes swell and fade
 *   with period 1 / (1 - 2u) output pixels (CHECKS.md, the sampling identity).
 * Lines below BEAT_LOW pass cleanly. Frequencies are signed, cycles per source pixel.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { contrastThreshold, cyclesPerDegree, type Viewing } from './csf.js';
import { findPeaks } from './peaks.js';
import { describe } from './words.js';

export type PatternKind = 'fold' | 'beat' | 'clean';

export interface VisiblePattern {
  kind: PatternKind;
  /** Source frequency, cycles per source pixel, signed. */
  frequency: { fx: number; fy: number };
  /** Where the viewer sees it, cycles per output pixel: the folded frequency, or a beat's own frequency. */
  apparent: { fx: number; fy: number };
  /**
   * Cycles per degree at which the threshold is taken: the folded frequency, or for a beat its
   * carrier (the swelling shows only where the stripes themselves are resolved).
   */
  cyclesPerDegree: number;
  /** Michelson contrast of the false pattern in the rendition, linear light (0 when clean). */
  contrast: number;
  /** Contrast threshold (Mannos & Sakrison 1974, csf.ts) at cyclesPerDegree. */
  threshold: number;
  /** contrast / threshold: 1.0 is just visible. */
  margin: number;
  description: string;
  /** A spectral line, or the broadband fold of all the detail beyond the new Nyquist. */
  source: 'line' | 'broadband';
  /** Share of the source amplitude the filter passes, |Hx Hy|. */
  passed: number;
}

/** Lines at or above this fraction of the new Nyquist beat visibly (period 1/(1-2u) >= 6.7 px). */
export const BEAT_LOW = 0.85;
/** Lines are looked for beyond this fraction of the new Nyquist (nearer DC they pass cleanly). */
const LINE_INNER = 0.5;
/** Lines listed at most. */
const MAX_LINES = 8;

/** The planned response of one axis at |f| source cycles per pixel. */
export type Gain = (f: number) => number;

export interface VisibilityInput {
  spec: SourceSpectrum;
  scale: { x: number; y: number };
  hx: Gain;
  hy: Gain;
  viewing: Viewing;
}

const sinc = (x: number) => (x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x));
const wrap = (u: number) => u - Math.round(u);

/** Mean linear luminance of the source (0.5 when the spectrum predates it). */
export function meanOf(spec: SourceSpectrum): number {
  return spec.mean !== undefined && spec.mean > 0 ? spec.mean : 0.5;
}

/** Non-DC energy of a spectrum in its cell units (sum of cells plus the between-tile part). */
export function totalEnergy(spec: SourceSpectrum): number {
  let total = spec.coarse * spec.tileSize * spec.tileSize;
  for (let i = 0; i < spec.power.length; i++) total += spec.power[i];
  return total;
}

/** One spectral line as the rendition shows it. */
export function linePattern(
  input: VisibilityInput,
  line: { fx: number; fy: number; amplitude: number },
  mean: number,
): VisiblePattern {
  const { scale, viewing } = input;
  const passed = input.hx(Math.abs(line.fx)) * input.hy(Math.abs(line.fy));
  const shown = (line.amplitude * passed) / mean;
  const ux = scale.x * line.fx;
  const uy = scale.y * line.fy;
  const rx = Math.abs(ux) / 0.5;
  const ry = Math.abs(uy) / 0.5;
  const frequency = { fx: line.fx, fy: line.fy };
  let kind: PatternKind;
  let apparent: { fx: number; fy: number };
  let cpd: number;
  let contrast: number;
  if (rx > 1 || ry > 1) {
    kind = 'fold';
    apparent = { fx: wrap(ux), fy: wrap(uy) };
    cpd = cyclesPerDegree(Math.hypot(apparent.fx, apparent.fy), viewing);
    contrast = shown;
  } else if (Math.max(rx, ry) >= BEAT_LOW) {
    kind = 'beat';
    const beat = (u: number, r: number) => (r >= BEAT_LOW ? Math.sign(u) * (1 - 2 * Math.abs(u)) : u);
    apparent = { fx: beat(ux, rx), fy: beat(uy, ry) };
    const u = Math.max(Math.abs(ux), Math.abs(uy));
    cpd = cyclesPerDegree(Math.hypot(ux, uy), viewing);
    // The sampling image at 1 - u, through the square pixel's box response, against the line's own.
    contrast = shown * Math.min(1, sinc(1 - u) / sinc(u));
  } else {
    kind = 'clean';
    apparent = { fx: ux, fy: uy };
    cpd = cyclesPerDegree(Math.hypot(ux, uy), viewing);
    contrast = 0;
  }
  const threshold = contrastThreshold(cpd);
  const margin = contrast / threshold;
  const pattern = { kind, frequency, apparent, cyclesPerDegree: cpd, contrast, threshold, margin, source: 'line' as const, passed };
  return { ...pattern, description: describe(pattern) };
}

/** The strong spectral lines beyond LINE_INNER times the new Nyquist, with their amplitudes. */
export function linesOf(input: VisibilityInput, total: number): Array<{ fx: number; fy: number; amplitude: number }> {
  const { spec, scale } = input;
  const n = spec.tileSize;
  if (n === 0) return [];
  const peaks = findPeaks({
    power: spec.power,
    size: n,
    total,
    scale,
    nyquist: { x: 0.5 / scale.x, y: 0.5 / scale.y },
    hx: input.hx,
    hy: input.hy,
    inner: LINE_INNER,
    max: MAX_LINES,
  });
  // A line of amplitude A holds A^2 / 2 of the variance: share * total / n^2 (welch.ts units).
  return peaks
    .filter((p) => p.kind === 'periodic')
    .map((p) => ({ fx: p.fx, fy: p.fy, amplitude: Math.sqrt((2 * p.power * total) / (n * n)) }));
}
