/** Public surface of the pure resampling core. */
export type * from './types.js';
export { makePlan, formatPlanHeader } from './plan/index.js';
export { renderRaster, type RenderOptions } from './pipeline/index.js';
export { frameOf, renderFrames, stackFrames } from './pipeline/frames.js';
export { planResponse, planResponseOf } from './resample/index.js';
export { kernelNames, renamedKernels } from './kernels/index.js';
export { srgbToLinear8, srgbToLinear16, linearToSrgb8, linearToSrgb16, linearMeanColour, hexColour } from './color/index.js';
export * from './risk/index.js';
