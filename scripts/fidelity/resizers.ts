/** The three resizers the fidelity table compares, each taking an 8-bit grey raster. */
import sharp, { type Sharp } from 'sharp';
import { makePlan, renderRaster } from '../../src/core/index.js';
import type { PixelRaster, PlanRequest } from '../../src/core/types.js';

export type Resizer = (src: PixelRaster, w: number, h: number) => Promise<Uint8Array>;

/**
 * foldwise with the defaults (kernel=auto, prefilter=auto, light=linear), or with options;
 * `sigmaOf` sets prefilter to a sigma computed from the factor (to compare published rules).
 */
export function ours(opts: Partial<PlanRequest> = {}, sigmaOf?: (s: number) => number): Resizer {
  return async (src, w, h) => {
    const plan = makePlan({
      sourceWidth: src.width, sourceHeight: src.height, targetWidth: w, targetHeight: h,
      kernel: 'auto', prefilter: sigmaOf ? sigmaOf(src.width / w) : 'auto', light: 'linear', ...opts,
    });
    return renderRaster(src, plan).data as Uint8Array;
  };
}

function input(src: PixelRaster) {
  return sharp(Buffer.from(src.data.buffer, src.data.byteOffset, src.data.byteLength), {
    raw: { width: src.width, height: src.height, channels: src.channels },
  });
}

async function firstChannel(img: Sharp): Promise<Uint8Array> {
  const { data, info } = await img.raw().toBuffer({ resolveWithObject: true });
  if (info.channels === 1) return new Uint8Array(data.buffer, data.byteOffset, data.length);
  const out = new Uint8Array(info.width * info.height);
  for (let i = 0; i < out.length; i++) out[i] = data[i * info.channels];
  return out;
}

/** The reference library's default resize (lanczos3 on encoded values). */
export const sharpDefault: Resizer = (src, w, h) => firstChannel(input(src).resize(w, h, { fit: 'fill' }));

/** The reference library resizing in linear light (CHECKS.md). */
export const sharpLinear: Resizer = (src, w, h) =>
  firstChannel(
    input(src).pipelineColourspace('scrgb').resize(w, h, { fit: 'fill' }).toColourspace('srgb'),
  );
