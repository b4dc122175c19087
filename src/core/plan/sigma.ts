import type { Kernel } from '../kernels/index.js';

/**
 * Content-adaptive sigma is capped at half an output pixel (in source pixels: 0.5 * scale),
 * the blur Lowe (2004) assumes a freshly sampled image carries: past it a rendition looks soft
 * however strong the periodic content is.
 */
export const ADAPTIVE_CAP = 0.5;

/**
 * The automatic Gaussian prefilter for a downscale by `scale` (sigma in source pixels).
 * Stretched by the factor, every kernel in the table is already an anti-alias low-pass, so
 * the automatic prefilter adds no blur of its own (0); explicit numbers and the content-
 * adaptive sigma are added to it in quadrature.
 */
export function autoSigma(_kernel: Kernel, _scale: number): number {
  return 0;
}
