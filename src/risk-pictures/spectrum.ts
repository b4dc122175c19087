/**
 * view=spectrum: the source's Welch power spectrum on a log scale (DC in the middle, fx to the
 * right, fy down), with the new Nyquist rectangle |fx| <= 0.5/sx, |fy| <= 0.5/sy drawn solid
 * and the planned filter's cutoff (|H| = 1/2, -6 dB) drawn dashed.
 */
import type { PlanResponse, RiskReport, SourceSpectrum } from '../core/risk/index.js';
import { blankImage, strokeRect, type RgbImage } from './canvas.js';
import { CUTOFF_LINE, NYQUIST_LINE, powerColour } from './palette.js';

/** Dynamic range shown: 70 dB below the strongest non-DC cell (8-bit-like detail, common practice). */
const RANGE_DB = 70;
/** Side of the picture in pixels (the spectrum is enlarged by whole pixel repeats). */
const SIDE = 512;

/** First frequency (source cycles/px, up to 0.5) where |H| falls to 1/2; undefined if it never does. */
export function halfGainFrequency(response: PlanResponse, axis: 'x' | 'y'): number | undefined {
  const steps = 2048;
  let prev = Math.abs(response(axis, 0));
  for (let k = 1; k <= steps; k++) {
    const f = (0.5 * k) / steps;
    const h = Math.abs(response(axis, f));
    if (h <= 0.5) return f - (0.5 / steps) * ((0.5 - h) / Math.max(1e-12, prev - h));
    prev = h;
  }
  return undefined;
}

/** The spectrum picture of one source for one plan. */
export function spectrumPicture(spec: SourceSpectrum, report: RiskReport, response: PlanResponse): RgbImage {
  const n = spec.tileSize;
  if (n === 0) return blankImage(SIDE / 2, SIDE / 2, [32, 32, 32]);
  const zoom = Math.max(1, Math.floor(SIDE / n));
  const img = blankImage(n * zoom, n * zoom);
  const centre = (n / 2) * n + n / 2;
  let max = 0;
  for (let i = 0; i < spec.power.length; i++) if (i !== centre) max = Math.max(max, spec.power[i]);
  const top = 10 * Math.log10(max || 1e-30);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const db = 10 * Math.log10(spec.power[j * n + i] + 1e-30);
      const colour = powerColour((db - top + RANGE_DB) / RANGE_DB);
      for (let y = j * zoom; y < (j + 1) * zoom; y++) {
        for (let x = i * zoom; x < (i + 1) * zoom; x++) img.data.set(colour, 3 * (y * img.width + x));
      }
    }
  }
  // Frequency f sits at picture coordinate (n/2 + f n + 1/2) zoom (cell centres).
  const at = (f: number) => Math.round((n / 2 + f * n + 0.5) * zoom);
  const box = (fx: number, fy: number, colour: typeof NYQUIST_LINE, dash: number) => {
    if (fx < 0.5 || fy < 0.5) strokeRect(img, at(-Math.min(fx, 0.5)), at(-Math.min(fy, 0.5)), at(Math.min(fx, 0.5)), at(Math.min(fy, 0.5)), colour, dash);
  };
  box(report.nyquist.x, report.nyquist.y, NYQUIST_LINE, 0);
  const cx = halfGainFrequency(response, 'x');
  const cy = halfGainFrequency(response, 'y');
  if (cx !== undefined || cy !== undefined) box(cx ?? 0.5, cy ?? 0.5, CUTOFF_LINE, 6);
  return img;
}
