/**
 * A reconstruction kernel as data. `weight(x)` is defined for x in kernel units (source
 * pixels when upscaling, output pixels when the support is stretched for a downscale) and is
 * zero for |x| >= support. Weights need not sum to 1 at a phase: the weight tables normalise
 * every output pixel.
 */
export interface Kernel {
  readonly name: string;
  /** Half-width in kernel units. */
  readonly support: number;
  /** 1 at 0 and 0 at every other integer: reproduces samples exactly when upscaling. */
  readonly interpolating: boolean;
  /** false only for nearest, which picks one sample at any factor. */
  readonly stretch: boolean;
  /** Where the formula comes from, for the plan's reason and the docs. */
  readonly source: string;
  /**
   * Outputs are clamped to the range of the source samples under the central lobe
   * (resample/limit.ts): no overshoot or dark halo at hard edges. Set on the default only.
   */
  readonly limitsRinging?: boolean;
  weight(x: number): number;
}

/** sin(pi x) / (pi x), with sinc(0) = 1. */
export function sinc(x: number): number {
  if (x === 0) return 1;
  const p = Math.PI * x;
  return Math.sin(p) / p;
}
