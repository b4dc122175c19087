/**
 * view=map: a grey preview of the source with each region of the risk grid tinted by how
 * visible its false patterns would be, in threshold units (1.0 = just visible; margins.ts), on the
 * "madder" ramp; the value written in every tinted region; a legend strip below in the same
 * units; the crop outlined when the rendition shows only part of the source.
 */
import type { CropRect } from '../../core/types.js';
import { textWidth } from '../../lib/font.js';
import { blankImage, haloLabel, label, strokeRect, tintRect, type RgbImage } from './rgb-image.js';
import { regionMargins, type MarginSource } from './margins.js';
import { CROP_LINE, INK, marginColour, PAPER } from './palette.js';

/** Regions below this margin are left untinted: four times under threshold, nothing to see. */
export const UNTINTED_BELOW = 0.25;
/** The ramp spans 1/4 to 8 threshold units on a log scale (five doublings), 1.0 at 0.4. */
const LOG2_LOW = -2;
const LOG2_HIGH = 3;
const LEGEND_HEIGHT = 96;
const MIN_WIDTH = 584;
/** Legend text in font cells of 2 x 2 px (14 px capitals). */
const S = 2;

/** Position of a margin on the ramp, 0..1 (log scale). */
export const rampPosition = (margin: number) =>
  Math.min(1, Math.max(0, (Math.log2(Math.max(margin, 1e-9)) - LOG2_LOW) / (LOG2_HIGH - LOG2_LOW)));

/** Opacity of a region's tint: none below 1/4, then from a light hint to most of the picture. */
const alphaOf = (margin: number) => (margin < UNTINTED_BELOW ? 0 : 0.3 + 0.5 * rampPosition(margin));

const marginText = (m: number) => (m >= 10 ? m.toFixed(0) : m.toFixed(1));

/**
 * Turns the preview grey and a little lighter (Rec. 709 luma weights on the codes, a display
 * approximation that is enough for a backdrop), so the tints stand out on any picture.
 */
function greyBackdrop(img: RgbImage): void {
  const d = img.data;
  for (let i = 0; i < d.length; i += 3) {
    const g = Math.round(40 + 0.7 * (0.2126 * d[i] + 0.7152 * d[i + 1] + 0.0722 * d[i + 2]));
    d[i] = d[i + 1] = d[i + 2] = g;
  }
}

function legend(img: RgbImage, y0: number): void {
  const x0 = 12;
  const width = Math.min(img.width - 24, 560);
  label(img, 'VISIBILITY, THRESHOLD UNITS (1 = JUST VISIBLE)', x0, y0 + 6, INK, S);
  const barY = y0 + 26;
  for (let x = 0; x < width; x++) tintRect(img, x0 + x, barY, x0 + x + 1, barY + 12, marginColour(x / (width - 1)), 1);
  strokeRect(img, x0 - 1, barY - 1, x0 + width, barY + 12, INK);
  for (let e = LOG2_LOW; e <= LOG2_HIGH; e++) {
    const x = x0 + Math.round(((e - LOG2_LOW) / (LOG2_HIGH - LOG2_LOW)) * (width - 1));
    const text = e === LOG2_LOW ? '1/4' : e === LOG2_HIGH ? '8+' : String(2 ** e).replace('0.', '.');
    tintRect(img, x, barY + 12, x + 1, barY + (e === 0 ? 20 : 16), INK, 1);
    const left = Math.max(x0, Math.min(x - Math.floor(textWidth(text, S) / 2), x0 + width - textWidth(text, S)));
    label(img, text, left, barY + 22, INK, S);
  }
  label(img, 'NO TINT: UNDER 1/4, NOTHING TO SEE', x0, barY + 44, INK, S);
}

/** The map of a report: its per-region margins (margins.ts) drawn by `marginMap`. */
export function riskMap(preview: RgbImage, report: MarginSource, source: { width: number; height: number }, crop: CropRect): RgbImage {
  const { columns, rows } = report.grid;
  return marginMap(preview, { columns, rows, cells: regionMargins(report) }, source, crop);
}

/**
 * Draws `margins` (threshold units per region, row-major) over `preview`, a picture of the
 * whole source (any size, same aspect), and a legend below it. Returns a new picture;
 * `preview` is turned grey in place.
 */
export function marginMap(
  preview: RgbImage,
  margins: { columns: number; rows: number; cells: ArrayLike<number> },
  source: { width: number; height: number },
  crop: CropRect,
): RgbImage {
  const { columns, rows, cells } = margins;
  const { width: w, height: h } = preview;
  greyBackdrop(preview);
  const img = blankImage(Math.max(w, MIN_WIDTH), h + LEGEND_HEIGHT, PAPER);
  for (let y = 0; y < h; y++) img.data.set(preview.data.subarray(3 * y * w, 3 * (y + 1) * w), 3 * y * img.width);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns; c++) {
      const margin = cells[r * columns + c];
      const x0 = Math.round((c * w) / columns);
      const x1 = Math.round(((c + 1) * w) / columns);
      const y0 = Math.round((r * h) / rows);
      const y1 = Math.round(((r + 1) * h) / rows);
      tintRect(img, x0, y0, x1, y1, marginColour(rampPosition(margin)), alphaOf(margin));
      strokeRect(img, x0, y0, x1 - 1, y1 - 1, [70, 70, 70], 0);
      if (margin >= UNTINTED_BELOW && x1 - x0 > 56 && y1 - y0 > 22) haloLabel(img, marginText(margin), x0 + 5, y0 + 5, PAPER, INK, S);
    }
  }
  const whole = crop.x <= 0 && crop.y <= 0 && crop.width >= source.width && crop.height >= source.height;
  if (!whole) {
    const sx = w / source.width;
    const sy = h / source.height;
    const [x0, y0] = [Math.round(crop.x * sx), Math.round(crop.y * sy)];
    strokeRect(img, x0, y0, Math.round((crop.x + crop.width) * sx) - 1, Math.round((crop.y + crop.height) * sy) - 1, CROP_LINE, 8);
  }
  legend(img, h);
  return img;
}
