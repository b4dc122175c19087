import type { CropRect } from '../types.js';

/**
 * Where a rendition's pixels come from and where they go, following CSS object-fit and
 * object-position (CSS Images Module Level 3, §5.5 and §5.6). Pure arithmetic on sizes.
 */

export type Fit = 'contain' | 'cover' | 'fill' | 'scale-down';

/** A point as fractions 0..1 of the free space on each axis (50% 50% is centred). */
export interface Position {
  x: number;
  y: number;
}

export interface LayoutRequest {
  width?: number;
  height?: number;
  /** Pixel density as in srcset (CSS pixels to device pixels); multiplies width and height. */
  density: number;
  fit: Fit;
  position: Position;
  /**
   * Largest enlargement (output px per source px) the layout may reach; default unlimited.
   * Past it the whole box shrinks by one factor, so the shape asked for is kept.
   */
  maxScale?: number;
}

export interface RenditionLayout {
  /** Size of the resampled picture, in output pixels (integers, at least 1). */
  targetWidth: number;
  targetHeight: number;
  /** The part of the source that maps onto the whole target; exact and fractional. */
  crop: CropRect;
  /** contain / scale-down with bars: the output box and where the picture sits in it. */
  canvas?: { width: number; height: number; left: number; top: number };
  /** Set when maxScale shrank the box: the output size (canvas or target) the request asked for. */
  clamped?: { width: number; height: number; scale: number };
}

const atLeastOne = (v: number) => Math.max(1, Math.round(v));

/**
 * Lays out a rendition of a `src`-sized source.
 *
 * - One side given: the other follows the source's aspect ratio; fit does not matter,
 *   except that scale-down never exceeds the source size.
 * - fill: the whole source is stretched to the box.
 * - cover: the source is scaled to cover the box and cropped; the crop is placed by
 *   `position` as object-position does: offset = (free space) x fraction (CSS Backgrounds
 *   and Borders Module Level 3, §3.6 background-position: a percentage "refers to the size of
 *   the background positioning area minus the size of the background image"). The crop is
 *   computed from the rounded target, so both axes scale by exactly the same factor.
 * - contain: the whole source fits inside the box; the canvas is the box, the picture sits in
 *   it by `position`. No canvas when the picture fills the box.
 * - scale-down: contain, but never larger than the source (CSS Images 3: "as if none or
 *   contain were specified, whichever would result in a smaller concrete object size").
 * - maxScale: when the fit would enlarge the source's pixels more than this, the box shrinks
 *   by one factor until it does not (same shape, same crop, fewer pixels) and `clamped`
 *   says what was asked. The browser scales the smaller picture up at display for free.
 *
 * @throws RangeError for non-positive or non-finite sizes, density or positions outside 0..1.
 */
export function layoutRendition(src: { width: number; height: number }, req: LayoutRequest): RenditionLayout {
  const { width: sw, height: sh } = src;
  if (!(sw > 0 && sh > 0 && Number.isFinite(sw) && Number.isFinite(sh))) {
    throw new RangeError(`Source size must be positive, not ${sw}x${sh}.`);
  }
  if (!(req.density > 0 && Number.isFinite(req.density))) throw new RangeError('density must be positive.');
  if (!(req.position.x >= 0 && req.position.x <= 1 && req.position.y >= 0 && req.position.y <= 1)) {
    throw new RangeError('position must be fractions from 0 to 1.');
  }
  for (const side of [req.width, req.height]) {
    if (side !== undefined && !(side > 0 && Number.isFinite(side))) throw new RangeError('width and height must be positive.');
  }
  if (req.width === undefined && req.height === undefined) throw new RangeError('width or height is required.');
  const limit = req.maxScale ?? Infinity;
  if (!(limit >= 1)) throw new RangeError('maxScale must be at least 1.');

  const boxW = req.width === undefined ? undefined : req.width * req.density;
  const boxH = req.height === undefined ? undefined : req.height * req.density;
  const asked = place(src, boxW, boxH, req);
  const k = scaleOf(src, boxW, boxH, req.fit);
  if (k <= limit) return asked;
  // Shrink the box by limit / k, rounding down (a rounded-up pixel would enlarge past the limit).
  const shrink = (side?: number) => (side === undefined ? undefined : Math.max(1, Math.floor((side * limit) / k + 1e-6)));
  const askedBox = asked.canvas ?? { width: asked.targetWidth, height: asked.targetHeight };
  return { ...place(src, shrink(boxW), shrink(boxH), req), clamped: { ...askedBox, scale: k } };
}

/**
 * The enlargement a box asks of the source's pixels: one side given, that side's ratio; cover
 * and fill, the larger ratio (the axis enlarged most); contain, the smaller; scale-down never
 * more than 1 (CSS Images 3, object-fit).
 */
function scaleOf(src: { width: number; height: number }, boxW: number | undefined, boxH: number | undefined, fit: Fit): number {
  const kx = boxW === undefined ? undefined : boxW / src.width;
  const ky = boxH === undefined ? undefined : boxH / src.height;
  const k = kx === undefined || ky === undefined ? (kx ?? ky!) : fit === 'contain' || fit === 'scale-down' ? Math.min(kx, ky) : Math.max(kx, ky);
  return fit === 'scale-down' ? Math.min(k, 1) : k;
}

/** The layout of a box in output pixels (density already applied). */
function place(src: { width: number; height: number }, boxW: number | undefined, boxH: number | undefined, req: LayoutRequest): RenditionLayout {
  const { width: sw, height: sh } = src;
  const full: CropRect = { x: 0, y: 0, width: sw, height: sh };

  if (boxW === undefined || boxH === undefined) {
    // One side: k from that side; scale-down caps k at 1 (never upscales).
    let k = boxW !== undefined ? boxW / sw : boxH! / sh;
    if (req.fit === 'scale-down') k = Math.min(k, 1);
    return { targetWidth: atLeastOne(sw * k), targetHeight: atLeastOne(sh * k), crop: full };
  }

  const tw = atLeastOne(boxW);
  const th = atLeastOne(boxH);
  switch (req.fit) {
    case 'fill':
      return { targetWidth: tw, targetHeight: th, crop: full };
    case 'cover': {
      const k = Math.max(tw / sw, th / sh);
      // One of these equals the source side exactly; min() guards against the last ulp.
      const cw = Math.min(sw, tw / k);
      const ch = Math.min(sh, th / k);
      const crop = { x: (sw - cw) * req.position.x, y: (sh - ch) * req.position.y, width: cw, height: ch };
      return { targetWidth: tw, targetHeight: th, crop };
    }
    case 'contain':
    case 'scale-down': {
      let k = Math.min(tw / sw, th / sh);
      if (req.fit === 'scale-down') k = Math.min(k, 1);
      const iw = Math.min(tw, atLeastOne(sw * k));
      const ih = Math.min(th, atLeastOne(sh * k));
      const layout: RenditionLayout = { targetWidth: iw, targetHeight: ih, crop: full };
      if (iw !== tw || ih !== th) {
        layout.canvas = {
          width: tw,
          height: th,
          left: Math.round((tw - iw) * req.position.x),
          top: Math.round((th - ih) * req.position.y),
        };
      }
      return layout;
    }
    default:
      throw new RangeError(`Unknown fit "${String(req.fit)}".`);
  }
}

export { parsePosition } from './position.js';
