/**
 * Where the enlarged crops come from: the riskiest cell of the report's grid, mapped from
 * source pixels onto the rendition through the fit crop, as a window of output pixels, and
 * the integer zoom that shows it. Pure arithmetic, no DOM: tested in Node.
 */

export interface Geometry {
  sourceWidth: number;
  sourceHeight: number;
  /** The region of the source that fills the rendition, in source pixels. */
  crop: { x: number; y: number; width: number; height: number };
  /** The picture's size in output pixels (without any contain bars). */
  targetWidth: number;
  targetHeight: number;
  /** Where the picture sits in the output image when `contain` adds bars; default 0, 0. */
  offset?: { x: number; y: number };
}

export interface Grid {
  columns: number;
  rows: number;
  /** Row-major risk per cell, 0..1. */
  cells: ArrayLike<number>;
}

/** A window of the output image, in its pixels, and the grid cell it shows. */
export interface ZoomWindow {
  x: number;
  y: number;
  width: number;
  height: number;
  column: number;
  row: number;
  risk: number;
}

/** Side of the enlarged window in output pixels, and the canvas size it is drawn to. */
const windowSide = 48;
const canvasSide = 288;

/** A cell's rectangle in rendition pixels, or undefined when the fit crop leaves it out. */
function cellOnTarget(grid: Grid, geo: Geometry, column: number, row: number) {
  const sx = geo.targetWidth / geo.crop.width;
  const sy = geo.targetHeight / geo.crop.height;
  const x0 = Math.max(0, ((column * geo.sourceWidth) / grid.columns - geo.crop.x) * sx);
  const x1 = Math.min(geo.targetWidth, (((column + 1) * geo.sourceWidth) / grid.columns - geo.crop.x) * sx);
  const y0 = Math.max(0, ((row * geo.sourceHeight) / grid.rows - geo.crop.y) * sy);
  const y1 = Math.min(geo.targetHeight, (((row + 1) * geo.sourceHeight) / grid.rows - geo.crop.y) * sy);
  return x1 > x0 && y1 > y0 ? { x0, x1, y0, y1 } : undefined;
}

function centred(centre: number, side: number, extent: number): number {
  return Math.round(Math.min(Math.max(0, centre - side / 2), extent - side));
}

/** The window around the riskiest grid cell that the rendition shows; undefined if none. */
export function riskiestWindow(grid: Grid, geo: Geometry): ZoomWindow | undefined {
  let best: ZoomWindow | undefined;
  for (let row = 0; row < grid.rows; row++) {
    for (let column = 0; column < grid.columns; column++) {
      const risk = grid.cells[row * grid.columns + column];
      if (best && !(risk > best.risk)) continue;
      const rect = cellOnTarget(grid, geo, column, row);
      if (!rect) continue;
      const width = Math.min(windowSide, geo.targetWidth);
      const height = Math.min(windowSide, geo.targetHeight);
      const x = centred((rect.x0 + rect.x1) / 2, width, geo.targetWidth);
      const y = centred((rect.y0 + rect.y1) / 2, height, geo.targetHeight);
      best = { x: x + (geo.offset?.x ?? 0), y: y + (geo.offset?.y ?? 0), width, height, column, row, risk };
    }
  }
  return best;
}

/** The integer enlargement that brings the window close to the canvas size. */
export function zoomFactor(win: ZoomWindow): number {
  return Math.max(2, Math.floor(canvasSide / Math.max(win.width, win.height)));
}
