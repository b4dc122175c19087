/**
 * Where the Welch tiles go: a grid of regions over the whole image and a bounded number of
 * square tiles in each, so a 12 MP source costs about as much as a 3 MP one would.
 */

/** Regions and tile corners (top-left, whole pixels) for one image. */
export interface TileLayout {
  /** Tile side in pixels (a power of two), 0 when the image is too small to analyse. */
  tileSize: number;
  columns: number;
  rows: number;
  /** x, y pairs of each tile's top-left corner; tiles never leave the image. */
  corners: Int32Array;
  /** Region index (row-major) of each tile. */
  region: Int32Array;
}

/** Largest tile side; 128 gives a frequency step of 1/128 cycles per pixel. */
const MAX_TILE = 128;
/** Smallest tile that still has a useful spectrum. */
const MIN_TILE = 8;
/** Regions along the longer side of the image. */
const MAX_REGIONS = 8;
/** Upper bound on tiles per image; the analysis cost is linear in it. */
export const MAX_TILES = 64;

function pow2Floor(v: number): number {
  return v < 1 ? 0 : 2 ** Math.floor(Math.log2(v));
}

/** Positions of `count` tiles of side `t` spread evenly over [start, end), clamped to [0, limit - t]. */
function spread(start: number, end: number, count: number, t: number, limit: number, out: number[]): void {
  for (let i = 0; i < count; i++) {
    const centre = count === 1 ? (start + end) / 2 : start + t / 2 + ((end - start - t) * i) / (count - 1);
    out.push(Math.min(limit - t, Math.max(0, Math.round(centre - t / 2))));
  }
}

/** Lay out regions and tiles for a width x height image (integers >= 1). */
export function layoutTiles(width: number, height: number): TileLayout {
  if (!(width >= 1 && height >= 1)) throw new RangeError(`bad image size ${width}x${height}`);
  const short = Math.min(width, height);
  let t = Math.min(MAX_TILE, Math.max(MIN_TILE, pow2Floor(short / 2)));
  if (t > short) t = pow2Floor(short);
  if (t < 4) return { tileSize: 0, columns: 1, rows: 1, corners: new Int32Array(0), region: new Int32Array(0) };
  const long = Math.max(width, height);
  const along = (side: number) =>
    Math.max(1, Math.min(Math.floor(side / t), Math.round((MAX_REGIONS * side) / long)));
  const columns = along(width);
  const rows = along(height);
  // Tiles per region along each axis: as many 50 %-overlapping tiles as fit, within the budget.
  const perAxis = Math.max(1, Math.floor(Math.sqrt(MAX_TILES / (columns * rows))));
  const fit = (side: number) => Math.min(perAxis, Math.max(1, Math.floor((side - t) / (t / 2)) + 1));
  const corners: number[] = [];
  const region: number[] = [];
  for (let r = 0; r < rows; r++) {
    const y0 = (r * height) / rows;
    const y1 = ((r + 1) * height) / rows;
    const ys: number[] = [];
    spread(y0, y1, fit(y1 - y0), t, height, ys);
    for (let c = 0; c < columns; c++) {
      const x0 = (c * width) / columns;
      const x1 = ((c + 1) * width) / columns;
      const xs: number[] = [];
      spread(x0, x1, fit(x1 - x0), t, width, xs);
      for (const y of ys) {
        for (const x of xs) {
          corners.push(x, y);
          region.push(r * columns + c);
        }
      }
    }
  }
  return { tileSize: t, columns, rows, corners: Int32Array.from(corners), region: Int32Array.from(region) };
}
