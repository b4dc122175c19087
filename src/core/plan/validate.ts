import type { CropRect, PlanRequest } from '../types.js';
import { findKernel } from '../kernels/index.js';

/** Largest side the core plans for (a 65535-pixel side is the JPEG and WebP limit). */
export const MAX_SIDE = 65535;

function positiveInt(name: string, v: number): void {
  if (!(Number.isInteger(v) && v >= 1 && v <= MAX_SIDE)) {
    throw new RangeError(`${name} must be an integer in 1..${MAX_SIDE}, got ${v}`);
  }
}

function finiteAtLeast(name: string, v: number, min: number): void {
  if (!(Number.isFinite(v) && v >= min)) throw new RangeError(`${name} must be a finite number >= ${min}, got ${v}`);
}

/** The crop, defaulted to the whole source and checked to lie inside it. */
function validCrop(req: PlanRequest): CropRect {
  const crop = req.crop ?? { x: 0, y: 0, width: req.sourceWidth, height: req.sourceHeight };
  finiteAtLeast('crop.x', crop.x, 0);
  finiteAtLeast('crop.y', crop.y, 0);
  if (!(crop.width > 0 && crop.height > 0)) {
    throw new RangeError(`crop must have a positive size, got ${crop.width}x${crop.height}`);
  }
  const slack = 1e-9 * Math.max(req.sourceWidth, req.sourceHeight);
  if (!(crop.x + crop.width <= req.sourceWidth + slack && crop.y + crop.height <= req.sourceHeight + slack)) {
    throw new RangeError('crop must lie inside the source');
  }
  return { x: crop.x, y: crop.y, width: crop.width, height: crop.height };
}

/** Throws a RangeError naming the first bad field of the request (NaN included). */
export function validateRequest(req: PlanRequest): CropRect {
  positiveInt('sourceWidth', req.sourceWidth);
  positiveInt('sourceHeight', req.sourceHeight);
  positiveInt('targetWidth', req.targetWidth);
  positiveInt('targetHeight', req.targetHeight);
  if (req.kernel !== 'auto' && !findKernel(req.kernel)) throw new RangeError(`unknown kernel ${req.kernel}`);
  if (typeof req.prefilter === 'number') finiteAtLeast('prefilter', req.prefilter, 0);
  else if (req.prefilter !== 'auto' && req.prefilter !== 'none') throw new RangeError(`bad prefilter ${String(req.prefilter)}`);
  if (req.light !== 'linear' && req.light !== 'encoded') throw new RangeError(`bad light ${String(req.light)}`);
  if (req.adaptiveSigma) {
    finiteAtLeast('adaptiveSigma.x', req.adaptiveSigma.x, 0);
    finiteAtLeast('adaptiveSigma.y', req.adaptiveSigma.y, 0);
    const c = req.adaptiveSigma.cutoff;
    if (c && !(c.x > 0 && c.x <= 1 && c.y > 0 && c.y <= 1)) throw new RangeError('adaptive cut-off factors must lie in (0, 1]');
  }
  return validCrop(req);
}
