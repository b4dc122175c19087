/** What a decode keeps of a source: its gamut, its frames (src/codec/decode-setup.ts). */
import type { Metadata } from 'sharp';

/** What a decode keeps of a source beyond an upright sRGB still. */
export interface DecodeWish {
  /**
   * 'source' keeps a wide-gamut source wide: its codes are converted (by lcms, through sharp)
   * to Display P3, whose transfer function is sRGB's, so the core linearises them exactly and
   * resamples in linear light of P3's primaries. 'srgb' converts every source to sRGB.
   */
  gamut: 'srgb' | 'source';
  /** 'all' decodes every frame of an animated source, stacked; a number decodes that frame (0-based). */
  frames: 'all' | number;
}

/** The decode every caller had before wide gamut and animation were kept. */
export const stillSrgb: DecodeWish = { gamut: 'srgb', frames: 0 };

/** An animated source's timing, as GIF89a and the WebP container (RFC 9649, ANIM/ANMF) carry it. */
export interface Animation {
  /** Number of frames, stacked top to bottom in the raster. */
  frames: number;
  /** Each frame's display time in ms. */
  delays: number[];
  /** Times the animation plays; 0 loops for ever. */
  loop: number;
}

/** Frame delays (ms; GIF's hundredths scaled by libvips) and the loop count, one delay per frame. */
export function animationOf(meta: Metadata, pages: number): Animation {
  const given = meta.delay ?? [];
  // A frame without a delay shows for 100 ms (common practice of browsers for GIF).
  const delays = Array.from({ length: pages }, (_, i) => given[i] ?? 100);
  return { frames: pages, delays, loop: meta.loop ?? 0 };
}

