/**
 * view=spectrum: the source's Welch power spectrum on a log scale ("loom" ramp, DC in the
 * middle, fx to the right, fy down as in the picture), with labelled axes in cycles per source
 * px, the new Nyquist rectangle |fx| <= 0.5/sx, |fy| <= 0.5/sy drawn solid and labelled, the
 * planned filter's half-gain line (|H| = 1/2) dashed, and a colour bar in dB below the peak.
 */
import type { PlanResponse, RiskReport, SourceSpectrum } from '../../core/risk/index.js';
import { textWidth } from '../../lib/font.js';
import { blankImage, haloLabel, label, strokeRect, tintRect, type RgbImage } from './rgb-image.js';
import { CUTOFF_LINE, INK, NYQUIST_LINE, PAPER, powerColour } from './palette.js';

/** Dynamic range shown: 70 dB below the strongest non-DC cell (8-bit-like detail, common practice). */
const RANGE_DB = 70;
/** Side of the plot in pixels (the spectrum is enlarged by whole pixel repeats). */
const SIDE = 512;
/** Margins around the plot for the axis labels (left, top, bottom) and the colour bar (right). */
const LEFT = 64;
const TOP = 30;
const BOTTOM = 48;
const RIGHT = 120;
/** Labels in font cells of 2 x 2 px (14 px capitals): legible where the page shows the picture smaller. */
const S = 2;
const TICKS = [-0.5, -0.25, 0, 0.25, 0.5];

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

const tickText = (f: number) => (f === 0 ? '0' : f.toString().replace('0.', '.'));

function axes(img: RgbImage, side: number, at: (f: number) => number): void {
  for (const f of TICKS) {
    const p = at(f);
    const text = tickText(f);
    tintRect(img, LEFT + p, TOP + side, LEFT + p + 1, TOP + side + 5, INK, 1);
    label(img, text, Math.min(LEFT + side + 8 - textWidth(text, S), LEFT + p - Math.floor(textWidth(text, S) / 2)), TOP + side + 8, INK, S);
    tintRect(img, LEFT - 5, TOP + p, LEFT, TOP + p + 1, INK, 1);
    label(img, text, LEFT - 8 - textWidth(text, S), Math.min(TOP + side - 7 * S, Math.max(TOP - 4, TOP + p - 7)), INK, S);
  }
  const xTitle = 'FX, CYCLES PER SOURCE PX';
  label(img, xTitle, LEFT + Math.floor((side - textWidth(xTitle, S)) / 2), TOP + side + 28, INK, S);
  label(img, 'FY (DOWN), CYCLES PER SOURCE PX', 8, 6, INK, S);
}

function colourBar(img: RgbImage, side: number): void {
  const x0 = LEFT + side + 24;
  for (let y = 0; y < side; y++) tintRect(img, x0, TOP + y, x0 + 16, TOP + y + 1, powerColour(1 - y / (side - 1)), 1);
  strokeRect(img, x0 - 1, TOP - 1, x0 + 16, TOP + side, INK);
  for (let db = 0; db <= RANGE_DB; db += 10) {
    const y = TOP + Math.round((db / RANGE_DB) * (side - 1));
    tintRect(img, x0 + 16, y, x0 + 21, y + 1, INK, 1);
    label(img, db === 0 ? '0 DB' : `-${db}`, x0 + 24, Math.min(TOP + side - 7 * S, Math.max(TOP - 4, y - 7)), INK, S);
  }
  label(img, 'BELOW', x0 - 8, TOP + side + 8, INK, S);
  label(img, 'PEAK', x0 - 8, TOP + side + 28, INK, S);
}

/** The spectrum picture of one source for one plan. */
export function spectrumPicture(spec: SourceSpectrum, report: Pick<RiskReport, 'nyquist'>, response: PlanResponse): RgbImage {
  const n = spec.tileSize;
  if (n === 0) return blankImage(SIDE / 2, SIDE / 2, [32, 32, 32]);
  const zoom = Math.max(1, Math.floor(SIDE / n));
  const side = n * zoom;
  const img = blankImage(LEFT + side + RIGHT, TOP + side + BOTTOM, PAPER);
  const centre = (n / 2) * n + n / 2;
  let max = 0;
  for (let i = 0; i < spec.power.length; i++) if (i !== centre) max = Math.max(max, spec.power[i]);
  const top = 10 * Math.log10(max || 1e-30);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const db = 10 * Math.log10(spec.power[j * n + i] + 1e-30);
      const colour = powerColour((db - top + RANGE_DB) / RANGE_DB);
      tintRect(img, LEFT + i * zoom, TOP + j * zoom, LEFT + (i + 1) * zoom, TOP + (j + 1) * zoom, colour, 1);
    }
  }
  // Frequency f sits at plot coordinate (n/2 + f n + 1/2) zoom (cell centres), clamped to the plot.
  const at = (f: number) => Math.min(side - 1, Math.round((n / 2 + f * n + 0.5) * zoom));
  const box = (fx: number, fy: number, colour: typeof NYQUIST_LINE, dash: number) => {
    const [x0, x1] = [at(-Math.min(fx, 0.5)), at(Math.min(fx, 0.5))];
    const [y0, y1] = [at(-Math.min(fy, 0.5)), at(Math.min(fy, 0.5))];
    strokeRect(img, LEFT + x0, TOP + y0, LEFT + x1, TOP + y1, colour, dash);
    return { x0: LEFT + x0, y0: TOP + y0 };
  };
  const cx = halfGainFrequency(response, 'x');
  const cy = halfGainFrequency(response, 'y');
  if (cx !== undefined || cy !== undefined) box(cx ?? 0.5, cy ?? 0.5, CUTOFF_LINE, 6);
  const { x: nx, y: ny } = report.nyquist;
  if (nx < 0.5 || ny < 0.5) {
    const corner = box(nx, ny, NYQUIST_LINE, 0);
    const text = `NEW NYQUIST ${nx === ny ? nx.toFixed(3) : `${nx.toFixed(3)} / ${ny.toFixed(3)}`}`;
    const x = Math.max(LEFT + 2, Math.min(corner.x0, LEFT + side - textWidth(text, S) - 2));
    haloLabel(img, text, x, Math.max(TOP + 2, corner.y0 - 7 * S - 4), NYQUIST_LINE, INK, S);
  } else {
    haloLabel(img, 'NO NEW NYQUIST: NOTHING FOLDS', LEFT + 4, TOP + 4, NYQUIST_LINE, INK, S);
  }
  if (cx !== undefined || cy !== undefined) haloLabel(img, 'DASHED: FILTER HALF GAIN', LEFT + 4, TOP + side - 7 * S - 4, CUTOFF_LINE, INK, S);
  axes(img, side, at);
  colourBar(img, side);
  return img;
}
