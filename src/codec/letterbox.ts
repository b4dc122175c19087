import type { Channels, PixelRaster } from '../core/types.js';
import type { Rgb } from '../schemas/colour.js';

/** A fill colour with its alpha, 0..1. */
export type Rgba = Rgb & { alpha: number };

/** Where a contained rendition sits on its letterbox canvas, in output pixels. */
export interface CanvasPlacement {
  width: number;
  height: number;
  left: number;
  top: number;
}

/**
 * Places a raster on a canvas filled with `fill` (the letterbox bars of object-fit: contain).
 * Not in place: returns a new raster. The output has an alpha channel when the raster has one
 * or the fill is not opaque, and colour channels when either the raster or the fill has
 * colour. 16-bit rasters stay 16-bit (fill scaled by 257, so 255 maps to 65535 exactly).
 *
 * @throws RangeError when the raster does not fit on the canvas at the given offset.
 */
export function placeOnCanvas(raster: PixelRaster, canvas: CanvasPlacement, fill: Rgba): PixelRaster {
  const { width: cw, height: ch, left, top } = canvas;
  if (
    !(Number.isInteger(cw) && Number.isInteger(ch) && Number.isInteger(left) && Number.isInteger(top)) ||
    left < 0 ||
    top < 0 ||
    left + raster.width > cw ||
    top + raster.height > ch
  ) {
    throw new RangeError(
      `A ${raster.width}x${raster.height} raster does not fit a ${cw}x${ch} canvas at ${left},${top}.`,
    );
  }
  const srcAlpha = raster.channels === 2 || raster.channels === 4;
  const srcColour = raster.channels >= 3;
  const fillGrey = fill.r === fill.g && fill.g === fill.b;
  const outColour = srcColour || !fillGrey;
  const outAlpha = srcAlpha || fill.alpha < 1;
  const outChannels = ((outColour ? 3 : 1) + (outAlpha ? 1 : 0)) as Channels;
  const deep = raster.data instanceof Uint16Array;
  const max = deep ? 65535 : 255;
  const unit = deep ? 257 : 1;

  const pixel = outColour ? [fill.r * unit, fill.g * unit, fill.b * unit] : [fill.r * unit];
  if (outAlpha) pixel.push(Math.round(fill.alpha * max));
  const out = deep ? new Uint16Array(cw * ch * outChannels) : new Uint8Array(cw * ch * outChannels);
  for (let i = 0; i < out.length; i += outChannels) {
    for (let c = 0; c < outChannels; c++) out[i + c] = pixel[c];
  }

  const src = raster.data;
  const sc = raster.channels;
  const srcColourCount = srcColour ? 3 : 1;
  for (let y = 0; y < raster.height; y++) {
    let s = y * raster.width * sc;
    let o = ((top + y) * cw + left) * outChannels;
    for (let x = 0; x < raster.width; x++, s += sc, o += outChannels) {
      if (outColour && !srcColour) {
        out[o] = out[o + 1] = out[o + 2] = src[s];
      } else {
        for (let c = 0; c < srcColourCount; c++) out[o + c] = src[s + c];
      }
      if (outAlpha) out[o + outChannels - 1] = srcAlpha ? src[s + sc - 1] : max;
    }
  }
  return { data: out, width: cw, height: ch, channels: outChannels };
}
