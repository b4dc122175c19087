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

/**
 * Tile corners along one axis: `count` tiles of side t spread evenly from 0 to side - t, each
 * with the region (of `regions` equal ones) holding its centre. With count >= regions and
 * t <= side / regions (layoutTiles ensures both), every region gets at least one tile: past
 * `regions` tiles the spacing is below a region's width, and at exactly `regions` the i-th
 * centre lies in region i (centres t/2 .. side - t/2 against region edges i side / regions).
 */
function alongAxis(side: number, t: number, regions: number, count: number): { at: number[]; region: number[] } {
  const at: number[] = [];
  const region: number[] = [];
  for (let i = 0; i < count; i++) {
    const corner = count === 1 ? (side - t) / 2 : ((side - t) * i) / (count - 1);
    const c = Math.round(corner);
    at.push(c);
    region.push(Math.min(regions - 1, Math.floor(((c + t / 2) * regions) / side)));
  }
  return { at, region };
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
  // Tiles per region along each axis: enough 50 %-overlapping tiles to cover the image
  // (Welch 1967), within the budget; past the budget they sample it evenly instead.
  const perAxis = Math.max(1, Math.floor(Math.sqrt(MAX_TILES / (columns * rows))));
  const count = (side: number, regions: number) =>
    Math.min(perAxis * regions, Math.max(1, Math.ceil((side - t) / (t / 2)) + 1));
  const xs = alongAxis(width, t, columns, Math.max(columns, count(width, columns)));
  const ys = alongAxis(height, t, rows, Math.max(rows, count(height, rows)));
  const corners: number[] = [];
  const region: number[] = [];
  for (let j = 0; j < ys.at.length; j++) {
    for (let i = 0; i < xs.at.length; i++) {
      corners.push(xs.at[i], ys.at[j]);
      region.push(ys.region[j] * columns + xs.region[i]);
    }
  }
  return { tileSize: t, columns, rows, corners: Int32Array.from(corners), region: Int32Array.from(region) };
}
