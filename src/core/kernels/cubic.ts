import type { Kernel } from './kernel.js';

/**
 * The (B, C) family of piecewise cubics, Mitchell & Netravali (1988), "Reconstruction filters
 * in computer graphics", SIGGRAPH '88, eq. 8. Support 2; B = 0 gives Keys (1981) cubic
 * convolution with a = -C, which interpolates.
 */
export function bcCubic(name: string, b: number, c: number, source: string): Kernel {
  const p0 = (6 - 2 * b) / 6;
  const p2 = (-18 + 12 * b + 6 * c) / 6;
  const p3 = (12 - 9 * b - 6 * c) / 6;
  const q0 = (8 * b + 24 * c) / 6;
  const q1 = (-12 * b - 48 * c) / 6;
  const q2 = (6 * b + 30 * c) / 6;
  const q3 = (-b - 6 * c) / 6;
  return {
    name,
    support: 2,
    interpolating: b === 0,
    stretch: true,
    source,
    weight(x: number): number {
      const t = Math.abs(x);
      if (t < 1) return p0 + t * t * (p2 + t * p3);
      if (t < 2) return q0 + t * (q1 + t * (q2 + t * q3));
      return 0;
    },
  };
}
