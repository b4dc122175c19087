/**
 * Shared shapes of the pure core. Everything here is plain data on typed arrays: the core
 * never does I/O and never imports a Node built-in, so the worker threads can run it as is.
 */
import type { GamutName } from './color/primaries.js';

/** Interleaved samples: 1 grey, 2 grey+alpha, 3 RGB, 4 RGBA. */
export type Channels = 1 | 2 | 3 | 4;

/** Decoded pixels as they leave the decoder: 8- or 16-bit sRGB-encoded, alpha straight. */
export interface PixelRaster {
  data: Uint8Array | Uint16Array;
  width: number;
  height: number;
  channels: Channels;
  /**
   * The primaries the codes refer to (both spaces use the sRGB transfer function); absent
   * means sRGB. Display P3 rasters come from wide-gamut sources kept wide.
   */
  gamut?: GamutName;
  /** Frames of the animated source these samples come from (absent: a still); reports say it. */
  sourceFrames?: number;
}

/** A rectangle in source pixels; fractional on purpose (the cover crop is exact). */
export interface CropRect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export type KernelName =
  | 'lanczos-2'
  | 'lanczos-3'
  | 'catmull-rom'
  | 'mitchell-netravali'
  | 'gaussian'
  | 'triangle'
  | 'box'
  | 'nearest-neighbour'
  | (string & {}); // designed kernels of the core's own table

export type KernelChoice = 'auto' | KernelName;
export type PrefilterChoice = 'auto' | 'none' | number;
export type LightMode = 'linear' | 'encoded';

/** What the caller asks of the plan. */
export interface PlanRequest {
  sourceWidth: number;
  sourceHeight: number;
  /** Region of the source that maps onto the whole target; default the whole source. */
  crop?: CropRect;
  targetWidth: number;
  targetHeight: number;
  kernel: KernelChoice;
  prefilter: PrefilterChoice;
  light: LightMode;
  /**
   * Content-adaptive extra blur chosen by the alias-risk analysis (source pixels, per axis).
   * Only honoured when prefilter is 'auto'.
   */
  adaptiveSigma?: AdaptiveFilter;
}

/**
 * What prefilter=auto adds: extra Gaussian sigma (source px, per axis; 0 in the visibility
 * plan) and, per axis, a factor on the kernel's own cut-off (1 = unchanged, 0.6..1).
 */
export interface AdaptiveFilter {
  x: number;
  y: number;
  cutoff?: { x: number; y: number };
}

/** One axis of a plan. */
export interface AxisPlan {
  /** source extent (after crop) / target extent; > 1 shrinks. */
  scale: number;
  /** Resolved kernel name (never 'auto'). */
  kernel: KernelName;
  /** Gaussian prefilter sigma in source pixels (0 = none). */
  sigma: number;
  /**
   * Where sigma came from: 'kernel' (none added: the stretched kernel is the low-pass),
   * 'content' (raised by the alias-risk analysis), 'asked' (a number in the request),
   * 'none' (turned off, or an upscale). Optional so hand-made plans stay valid.
   */
  sigmaFrom?: 'kernel' | 'content' | 'asked' | 'none';
  /** Number of reduce-by-2 pyramid stages before the final exact resample. */
  pyramidLevels: number;
  /**
   * Factor on the stretched kernel's own cut-off (prefilter=auto lowers it where a false
   * pattern would show: the kernel is stretched by scale / cutoff). Absent or 1: unchanged.
   */
  cutoff?: number;
}

export interface Plan {
  sourceWidth: number;
  sourceHeight: number;
  crop: CropRect;
  targetWidth: number;
  targetHeight: number;
  x: AxisPlan;
  y: AxisPlan;
  light: LightMode;
  /** One plain line: why this kernel and sigma. */
  reason: string;
}
