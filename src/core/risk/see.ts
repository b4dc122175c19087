/**
 * What a viewer sees in one planned rendition: the lines (visibility.ts) and the broadband fold
 * (broadband.ts) under the plan's axis gains, strongest first, and the level of the strongest.
 */
import type { SourceSpectrum } from '../spectrum/index.js';
import { foldCells, foldMargin, type FoldCells } from './broadband.js';
import { type Viewing } from './csf.js';
import { visibilityLevel } from './levels.js';
import type { RiskLevel } from './score.js';
import { linePattern, linesOf, meanOf, totalEnergy, type Gain, type VisiblePattern } from './visibility.js';
import { describe } from './words.js';
import { cyclesPerDegree } from './csf.js';

/** The parts of the model that do not depend on the filter: computed once per spectrum and plan size. */
export interface Scene {
  spec: SourceSpectrum;
  scale: { x: number; y: number };
  viewing: Viewing;
  mean: number;
  lines: Array<{ fx: number; fy: number; amplitude: number }>;
  cells: FoldCells;
  /** The rendition's own detail between 0.5x and 1x the new Nyquist: it masks the broadband fold. */
  own: FoldCells;
  /**
   * Amplitude factor of a cover crop: sqrt of how much more (or less) the cropped part folds
   * than the whole source (crop.ts); 1 for the whole source.
   */
  crop: number;
}

export interface Seen {
  patterns: VisiblePattern[];
  /** Largest margin of any false pattern (0 when none). */
  margin: number;
  level: RiskLevel;
}

export function sceneOf(spec: SourceSpectrum, scale: { x: number; y: number }, viewing: Viewing, crop = 1): Scene {
  const mean = meanOf(spec);
  const total = totalEnergy(spec);
  const one = () => 1;
  const lines = linesOf({ spec, scale, hx: one, hy: one, viewing }, total);
  const a = Math.sqrt(Math.max(0, crop));
  const cropped = lines.map((l) => ({ ...l, amplitude: l.amplitude * a }));
  return { spec, scale, viewing, mean, lines: cropped, cells: foldCells(spec, scale, viewing, mean / a, lines), own: foldCells(spec, scale, viewing, mean / a, [], true), crop };
}

/**
 * Contrast masking: a pattern on a textured background needs more contrast to be seen; the
 * threshold rises as (masker margin)^0.7 once the masker is above its own threshold (Legge &
 * Foley 1980, "Contrast masking in human vision", JOSA 70(12); exponent from memory). Applied
 * to the broadband fold, which lands among the rendition's own fine detail.
 */
export function masking(maskerMargin: number): number {
  return maskerMargin > 1 ? maskerMargin ** 0.7 : 1;
}

/** The broadband fold as one pattern (undefined when nothing beyond the new Nyquist passes). */
function broadband(scene: Scene, hx: Gain, hy: Gain): VisiblePattern | undefined {
  const { contrast, margin: bare, top } = foldMargin(scene.cells, hx, hy);
  const masker = foldMargin(scene.own, hx, hy).margin;
  const margin = bare / masking(masker);
  if (!(contrast > 0) || top < 0) return undefined;
  const fx = scene.cells.fx[top];
  const fy = scene.cells.fy[top];
  const u = (s: number, f: number) => s * f - Math.round(s * f);
  const apparent = { fx: u(scene.scale.x, fx), fy: u(scene.scale.y, fy) };
  const p = {
    kind: 'fold' as const,
    frequency: { fx, fy },
    apparent,
    cyclesPerDegree: cyclesPerDegree(Math.hypot(apparent.fx, apparent.fy), scene.viewing),
    contrast,
    threshold: margin > 0 ? contrast / margin : Infinity,
    margin,
    source: 'broadband' as const,
    passed: hx(Math.abs(fx)) * hy(Math.abs(fy)),
  };
  const words = describe(p).replace('folds into coarse bands', 'folds fine detail into grain and jagged edges, strongest at bands');
  return { ...p, description: words };
}

/** Every pattern of the scene under the axis gains, strongest false pattern first. */
export function see(scene: Scene, hx: Gain, hy: Gain): Seen {
  const input = { spec: scene.spec, scale: scene.scale, hx, hy, viewing: scene.viewing };
  const patterns = scene.lines.map((l) => linePattern(input, l, scene.mean));
  const b = broadband(scene, hx, hy);
  if (b) patterns.push(b);
  patterns.sort((a, c) => c.margin - a.margin);
  const margin = patterns.reduce((m, p) => Math.max(m, p.margin), 0);
  return { patterns, margin, level: visibilityLevel(margin) };
}
