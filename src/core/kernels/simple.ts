import type { Kernel } from './kernel.js';

/**
 * Box: the area average when stretched, half-open [-1/2, 1/2) so a sample on the boundary
 * counts once (common practice; Pillow's BOX filter, CHECKS.md).
 */
export const box: Kernel = {
  name: 'box',
  support: 0.5,
  interpolating: true,
  stretch: true,
  source: 'box (area average)',
  weight: (x) => (x >= -0.5 && x < 0.5 ? 1 : 0),
};

/** Nearest neighbour: the box's one sample in [-1/2, 1/2), never stretched (common practice). */
export const nearest: Kernel = { ...box, name: 'nearest-neighbour', stretch: false, source: 'nearest neighbour (common practice)' };

/** Triangle 1 - |x| (linear interpolation; the tent of Pillow's BILINEAR, CHECKS.md). */
export const triangle: Kernel = {
  name: 'triangle',
  support: 1,
  interpolating: true,
  stretch: true,
  source: 'triangle (linear interpolation)',
  weight: (x) => Math.max(0, 1 - Math.abs(x)),
};

/**
 * Gaussian exp(-x^2 / (2 * 0.5^2)), truncated at 2 (four sigma; the tail left out is
 * exp(-8) = 3e-4 of the peak). sigma = 1/2 kernel unit is the blur Lowe (2004) assumes a
 * freshly sampled image carries (CHECKS.md). Not interpolating: it blurs even at scale 1.
 */
export const gaussian: Kernel = {
  name: 'gaussian',
  support: 2,
  interpolating: false,
  stretch: true,
  source: 'Gaussian sigma=0.5',
  weight: (x) => (Math.abs(x) < 2 ? Math.exp(-2 * x * x) : 0),
};
