import type { Plan, PlanRequest } from '../types.js';
import { validateRequest } from './validate.js';
import { planAxis } from './axis.js';

/**
 * The plan for one rendition: kernel, prefilter sigma and pyramid levels per axis, the light
 * mode and a one-line reason. Pure; throws RangeError on a bad request (NaN included).
 */
export function makePlan(req: PlanRequest): Plan {
  const crop = validateRequest(req);
  const ax = req.adaptiveSigma?.x ?? 0;
  const ay = req.adaptiveSigma?.y ?? 0;
  const cut = req.adaptiveSigma?.cutoff;
  const x = planAxis(crop.width, req.targetWidth, req, req.prefilter === 'auto' ? ax : 0, cut?.x);
  const y = planAxis(crop.height, req.targetHeight, req, req.prefilter === 'auto' ? ay : 0, cut?.y);
  const light = req.light === 'encoded' ? 'encoded values (asked)' : 'linear light';
  const reason =
    x.why === y.why ? `both axes: ${x.why}; ${light}` : `x: ${x.why}; y: ${y.why}; ${light}`;
  return {
    sourceWidth: req.sourceWidth,
    sourceHeight: req.sourceHeight,
    crop,
    targetWidth: req.targetWidth,
    targetHeight: req.targetHeight,
    x: x.axis,
    y: y.axis,
    light: req.light,
    reason,
  };
}
