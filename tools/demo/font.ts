import { inkText } from '../../src/lib/font.js';
import { paint, type Picture, type Rgb } from './picture.js';

export { textWidth } from '../../src/lib/font.js';

/** Draws `text` on a demo picture with its top-left corner at (x, y), in the shared bitmap font. */
export function drawText(p: Picture, text: string, x: number, y: number, scale: number, ink: Rgb): void {
  inkText(text, x, y, scale, (px, py) => paint(p, px, py, ink, 1));
}
