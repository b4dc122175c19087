/**
 * Where the enlarged crops come from: the window of output pixels where the legacy copy and
 * the foldwise copy differ most in their pattern, and the integer zoom that shows it. Pure
 * arithmetic on grey levels, no DOM: tested in Node.
 *
 * "Differ in pattern" is the spread (standard deviation) of the difference of the two copies
 * inside the window: a uniform tone shift between them (the foldwise copy averages light, so
 * woven cloth comes out lighter everywhere) has no spread, false bands and lost detail do.
 */

/** A window of the output image, in its pixels, and how much the copies differ inside it. */
export interface ZoomWindow {
  x: number;
  y: number;
  width: number;
  height: number;
  /** Standard deviation of (legacy - foldwise) in the window, in 8-bit grey levels. */
  spread: number;
}

/** Side of the enlarged window in output pixels, and the canvas size it is drawn to. */
export const windowSide = 48;
const canvasSide = 288;
/** Window positions are tried every `step` pixels, kept `inset` px off the picture's edges. */
const step = 4;
/**
 * Kernels treat the picture's borders differently (each extends the edge its own way), so the
 * copies always differ a little there; a window that starts at the border would show that,
 * not the patterns. Pictures too small for the inset are searched edge to edge.
 */
const inset = 8;

/** Grey level of interleaved 8-bit RGBA (Rec. 709 luma weights on the codes, common practice). */
export function greyOf(rgba: ArrayLike<number>, pixels: number): Float64Array {
  const grey = new Float64Array(pixels);
  for (let i = 0; i < pixels; i++) grey[i] = 0.2126 * rgba[4 * i] + 0.7152 * rgba[4 * i + 1] + 0.0722 * rgba[4 * i + 2];
  return grey;
}

/** Summed-area table of `values` ((w + 1) x (h + 1), zero first row and column). */
function summed(values: (i: number) => number, w: number, h: number): Float64Array {
  const s = new Float64Array((w + 1) * (h + 1));
  for (let y = 0; y < h; y++) {
    let row = 0;
    for (let x = 0; x < w; x++) {
      row += values(y * w + x);
      s[(y + 1) * (w + 1) + x + 1] = s[y * (w + 1) + x + 1] + row;
    }
  }
  return s;
}

function positions(extent: number, side: number): number[] {
  const margin = extent >= side + 2 * inset ? inset : 0;
  const list: number[] = [];
  for (let p = margin; p + side < extent - margin; p += step) list.push(p);
  list.push(extent - margin - side);
  return list;
}

/**
 * The window (at most `side` px square) where two equal-size grey pictures differ most in
 * pattern; the first such window, top to bottom and left to right, on ties.
 */
export function differingWindow(a: Float64Array, b: Float64Array, width: number, height: number, side = windowSide): ZoomWindow {
  if (a.length !== width * height || b.length !== width * height) throw new RangeError('both copies must be width x height');
  const w = Math.min(side, width);
  const h = Math.min(side, height);
  const s1 = summed((i) => a[i] - b[i], width, height);
  const s2 = summed((i) => (a[i] - b[i]) ** 2, width, height);
  const box = (s: Float64Array, x: number, y: number) =>
    s[(y + h) * (width + 1) + x + w] - s[y * (width + 1) + x + w] - s[(y + h) * (width + 1) + x] + s[y * (width + 1) + x];
  let best: ZoomWindow = { x: 0, y: 0, width: w, height: h, spread: -1 };
  for (const y of positions(height, h)) {
    for (const x of positions(width, w)) {
      const n = w * h;
      const mean = box(s1, x, y) / n;
      const spread = Math.sqrt(Math.max(0, box(s2, x, y) / n - mean * mean));
      if (spread > best.spread + 1e-9) best = { x, y, width: w, height: h, spread };
    }
  }
  return best;
}

/** The integer enlargement that brings the window close to the canvas size. */
export function zoomFactor(win: Pick<ZoomWindow, 'width' | 'height'>): number {
  return Math.max(2, Math.floor(canvasSide / Math.max(win.width, win.height)));
}
