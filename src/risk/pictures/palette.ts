/**
 * Colour ramps of the risk pictures, of our own design: anchors taken from the inspector's own
 * colours (src/inspector/style.css), joined by straight lines in Oklab (Ottosson, B. (2020),
 * "A perceptual color space for image processing") with each anchor placed by its lightness,
 * so lightness changes evenly and in one direction along the ramp: the ramps also read in grey.
 */
import type { Rgb } from './rgb-image.js';
import { fromOklab, toOklab, type Lab } from './oklab.js';

const hex = (h: string): Rgb => [0, 2, 4].map((i) => parseInt(h.slice(i + 1, i + 3), 16)) as unknown as Rgb;

/** A 256-entry table from anchors in sRGB hex, anchors spaced by their Oklab lightness. */
function designRamp(anchors: readonly string[]): readonly Rgb[] {
  const labs = anchors.map((a) => toOklab(hex(a)));
  const first = labs[0].L;
  const span = labs[labs.length - 1].L - first;
  const at = labs.map((lab) => (lab.L - first) / span);
  const table: Rgb[] = [];
  for (let k = 0; k < 256; k++) {
    const t = k / 255;
    let i = 0;
    while (i < labs.length - 2 && t > at[i + 1]) i++;
    const f = Math.min(1, Math.max(0, (t - at[i]) / (at[i + 1] - at[i])));
    const mix = (key: keyof Lab) => labs[i][key] + (labs[i + 1][key] - labs[i][key]) * f;
    table.push(fromOklab({ L: mix('L'), a: mix('a'), b: mix('b') }));
  }
  return table;
}

const pick = (table: readonly Rgb[], t: number): Rgb => table[Math.round(Math.min(1, Math.max(0, t)) * 255)];

/**
 * "Loom", for log power, dark to light: ink #1d2326, accent teal #2c5d73, rust #b3541e,
 * ochre #e0a93b, paper #f6f5f2 (Oklab L 0.25, 0.45, 0.56, 0.77, 0.97).
 */
export const LOOM_ANCHORS = ['#1d2326', '#2c5d73', '#b3541e', '#e0a93b', '#f6f5f2'] as const;
const LOOM = designRamp(LOOM_ANCHORS);

/** Colour of a normalised log power 0..1 (0 darkest). */
export const powerColour = (t: number): Rgb => pick(LOOM, t);

/**
 * "Madder", for visibility, light to dark as a pattern grows more visible: pale ochre
 * #f0d08a, ochre #c98a3a, rust #b3541e, madder red #6b1d1d (Oklab L 0.87, 0.68, 0.56, 0.36).
 */
export const MADDER_ANCHORS = ['#f0d08a', '#c98a3a', '#b3541e', '#6b1d1d'] as const;
const MADDER = designRamp(MADDER_ANCHORS);

/** Colour of a position 0..1 on the visibility ramp (0 palest). */
export const marginColour = (t: number): Rgb => pick(MADDER, t);

/** Ink and paper of the labels, and the line colours. */
export const INK: Rgb = hex('#1d2326');
export const PAPER: Rgb = hex('#f6f5f2');
/** The new Nyquist (solid), the planned filter's half-gain line (dashed), a crop outline. */
export const NYQUIST_LINE: Rgb = [255, 255, 255];
export const CUTOFF_LINE: Rgb = hex('#7fc4d8');
export const CROP_LINE: Rgb = [255, 255, 255];
