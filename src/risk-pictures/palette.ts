/** Colour ramps of the risk pictures. */
import type { Rgb } from './canvas.js';

function ramp(stops: readonly Rgb[], t: number): Rgb {
  const v = Math.min(1, Math.max(0, t)) * (stops.length - 1);
  const i = Math.min(stops.length - 2, Math.floor(v));
  const f = v - i;
  const a = stops[i];
  const b = stops[i + 1];
  return [0, 1, 2].map((c) => Math.round(a[c] + (b[c] - a[c]) * f)) as unknown as Rgb;
}

/**
 * Risk 0..1: bluish green, orange, vermillion from the colour-blind-safe set of Okabe, M. &
 * Ito, K. (2008), "Color Universal Design (CUD): how to make figures and presentations that
 * are friendly to colorblind people".
 */
const RISK: readonly Rgb[] = [
  [0, 158, 115],
  [230, 159, 0],
  [213, 94, 0],
];

/** Colour of a risk score 0..1. */
export const riskColour = (score: number): Rgb => ramp(RISK, score);

/** Log power, dark to bright with rising lightness so it also reads in grey (common practice). */
const POWER: readonly Rgb[] = [
  [0, 0, 0],
  [42, 30, 108],
  [20, 118, 140],
  [226, 196, 64],
  [255, 255, 255],
];

/** Colour of a normalised log power 0..1. */
export const powerColour = (t: number): Rgb => ramp(POWER, t);

/** Line colours: the new Nyquist (solid) and the planned filter's cutoff (dashed). */
export const NYQUIST_LINE: Rgb = [255, 255, 255];
export const CUTOFF_LINE: Rgb = [86, 180, 233]; // Okabe & Ito (2008) sky blue
export const CROP_LINE: Rgb = [255, 255, 255];
