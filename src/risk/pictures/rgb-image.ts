/** A plain 8-bit RGB picture and the few drawing operations the risk pictures need. */
import { inkText } from '../../lib/font.js';

export interface RgbImage {
  data: Uint8Array;
  width: number;
  height: number;
}

export type Rgb = readonly [number, number, number];

export function blankImage(width: number, height: number, fill: Rgb = [0, 0, 0]): RgbImage {
  const data = new Uint8Array(width * height * 3);
  for (let i = 0; i < data.length; i += 3) data.set(fill, i);
  return { data, width, height };
}

/** Mixes `colour` over pixel (x, y) with opacity `alpha` (0..1); outside the picture: nothing. */
export function blend(img: RgbImage, x: number, y: number, colour: Rgb, alpha: number): void {
  if (x < 0 || y < 0 || x >= img.width || y >= img.height) return;
  const i = 3 * (y * img.width + x);
  for (let c = 0; c < 3; c++) img.data[i + c] = Math.round(img.data[i + c] * (1 - alpha) + colour[c] * alpha);
}

/** Tints the rectangle [x0, x1) x [y0, y1) with `colour` at opacity `alpha`. */
export function tintRect(img: RgbImage, x0: number, y0: number, x1: number, y1: number, colour: Rgb, alpha: number): void {
  for (let y = Math.max(0, y0); y < Math.min(img.height, y1); y++) {
    for (let x = Math.max(0, x0); x < Math.min(img.width, x1); x++) blend(img, x, y, colour, alpha);
  }
}

/** Outlines the rectangle with corners (x0, y0) and (x1, y1), inclusive; `dash` > 0 draws dashes of that length. */
export function strokeRect(img: RgbImage, x0: number, y0: number, x1: number, y1: number, colour: Rgb, dash = 0): void {
  const on = (k: number) => dash <= 0 || Math.floor(k / dash) % 2 === 0;
  for (let x = x0; x <= x1; x++) {
    if (on(x - x0)) {
      blend(img, x, y0, colour, 1);
      blend(img, x, y1, colour, 1);
    }
  }
  for (let y = y0; y <= y1; y++) {
    if (on(y - y0)) {
      blend(img, x0, y, colour, 1);
      blend(img, x1, y, colour, 1);
    }
  }
}

/** Writes `text` in the shared bitmap font, top-left corner at (x, y), each font cell `scale` px. */
export function label(img: RgbImage, text: string, x: number, y: number, colour: Rgb, scale = 1): void {
  inkText(text, x, y, scale, (px, py) => blend(img, px, py, colour, 1));
}

/** Writes `text` with a one-pixel `halo` around every stroke, legible on any background. */
export function haloLabel(img: RgbImage, text: string, x: number, y: number, colour: Rgb, halo: Rgb, scale = 1): void {
  for (const [dx, dy] of [[-1, 0], [1, 0], [0, -1], [0, 1], [-1, -1], [1, 1], [-1, 1], [1, -1]]) label(img, text, x + dx, y + dy, halo, scale);
  label(img, text, x, y, colour, scale);
}
