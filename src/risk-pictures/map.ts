/**
 * view=map: a grey preview of the source with each region of the risk grid tinted by its score
 * (more opaque where the risk is higher), the grid drawn, and the crop outlined when the
 * rendition shows only part of the source.
 */
import type { RiskReport } from '../core/risk/index.js';
import type { CropRect } from '../core/types.js';
import { strokeRect, tintRect, type RgbImage } from './canvas.js';
import { CROP_LINE, riskColour } from './palette.js';

/** Opacity of a cell's tint: a hint even at score 0, most of the picture hidden at 1 (common practice). */
const alphaOf = (score: number) => 0.25 + 0.45 * score;

/**
 * Turns the preview grey and a little darker (Rec. 709 luma weights on the codes, a display
 * approximation that is enough for a backdrop), so the risk colours stand out on any picture.
 */
function greyBackdrop(img: RgbImage): void {
  const d = img.data;
  for (let i = 0; i < d.length; i += 3) {
    const g = Math.round(0.75 * (0.2126 * d[i] + 0.7152 * d[i + 1] + 0.0722 * d[i + 2]));
    d[i] = d[i + 1] = d[i + 2] = g;
  }
}

/**
 * Draws the grid of `report` over `preview`, a picture of the whole source (any size, same
 * aspect). In place on `preview`, which it returns.
 */
export function riskMap(
  preview: RgbImage,
  report: Pick<RiskReport, 'grid'>,
  source: { width: number; height: number },
  crop: CropRect,
): RgbImage {
  const { columns, rows, cells } = report.grid;
  const { width: w, height: h } = preview;
  greyBackdrop(preview);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns; c++) {
      const score = cells[r * columns + c];
      const x0 = Math.round((c * w) / columns);
      const x1 = Math.round(((c + 1) * w) / columns);
      const y0 = Math.round((r * h) / rows);
      const y1 = Math.round(((r + 1) * h) / rows);
      tintRect(preview, x0, y0, x1, y1, riskColour(score), alphaOf(score));
      strokeRect(preview, x0, y0, x1 - 1, y1 - 1, [40, 40, 40], 0);
    }
  }
  const whole = crop.x <= 0 && crop.y <= 0 && crop.width >= source.width && crop.height >= source.height;
  if (!whole) {
    const sx = w / source.width;
    const sy = h / source.height;
    strokeRect(
      preview,
      Math.round(crop.x * sx),
      Math.round(crop.y * sy),
      Math.round((crop.x + crop.width) * sx) - 1,
      Math.round((crop.y + crop.height) * sy) - 1,
      CROP_LINE,
      8,
    );
  }
  return preview;
}
