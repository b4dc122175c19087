import sharp from 'sharp';
import { frameOf, stackFrames } from '../core/index.js';
import type { PixelRaster } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import type { Rgb } from '../schemas/colour.js';
import { placeOnCanvas, type CanvasPlacement } from './letterbox.js';
import { formatSpecs, type OutputFormat } from './formats.js';
import { tagPngSrgb } from './png-srgb.js';
import { tagJpegSrgb } from './jpeg-icc.js';
import type { Animation } from './wish.js';

export interface EncodeOptions {
  format: OutputFormat;
  /** 1..100; the format's default when left out; ignored by PNG. */
  quality?: number;
  /** Fills contain bars and flattens alpha for JPEG (the query's `background`, parsed there). */
  background: Rgb;
  /** object-fit: contain — the canvas the raster is placed on, from layoutRendition. */
  canvas?: CanvasPlacement;
  /** Stacked frames to write as an animation (WebP, GIF); other formats take the first frame. */
  animation?: Animation;
}

/**
 * Encodes an sRGB-encoded raster.
 *
 * - The output is tagged sRGB (an ICC profile for JPEG, WebP and AVIF; the PNG sRGB chunk for
 *   PNG), or Display P3 when the raster says so (`raster.gamut`: the P3 profile in every
 *   format, iCCP in PNG; GIF has no colour tag and gets sRGB codes upstream), and carries no
 *   other metadata: the raster has none, and sharp writes none unless
 *   asked. No EXIF, XMP or GPS ever leaves the service; GPS in a product shot tells where it
 *   was taken, often the photographer's home or workshop.
 * - Contain bars: in a format with alpha they are transparent when the raster has alpha
 *   (so the bars match the picture's own transparent surroundings), and the background
 *   colour otherwise. JPEG bars are the background colour.
 * - JPEG flattens alpha onto the background in sRGB-encoded values, the way browsers
 *   composite a transparent PNG over a page (CSS Compositing and Blending Level 1, §5.1
 *   simple alpha compositing), so a JPEG looks like the PNG shown on that background.
 * - A 16-bit raster becomes a 16-bit PNG; lossy formats get 8 bits, rounded to nearest.
 * - An animation (WebP, GIF) keeps each frame's delay and the loop count; GIF's palette is
 *   chosen per frame by libimagequant (through sharp), with its default dithering.
 *
 * @throws FoldwiseError ERR_PARAM_INVALID for a bad quality or format
 */
export async function encodeImage(raster: PixelRaster, opts: EncodeOptions): Promise<Buffer> {
  const spec = formatSpecs[opts.format];
  if (!spec) throw new FoldwiseError('ERR_PARAM_INVALID', `Unknown output format "${String(opts.format)}".`);
  const quality = opts.quality ?? spec.defaultQuality;
  if (quality !== undefined && !(Number.isInteger(quality) && quality >= 1 && quality <= 100)) {
    throw new FoldwiseError('ERR_PARAM_INVALID', 'quality must be an integer from 1 to 100.');
  }
  const background = opts.background;

  let r = raster;
  if (r.data instanceof Uint16Array && !spec.depths.includes(16)) r = to8Bit(r);
  if (opts.canvas) {
    const rasterAlpha = r.channels === 2 || r.channels === 4;
    const fill = { ...background, alpha: spec.hasAlpha && rasterAlpha ? 0 : 1 };
    const canvas = opts.canvas;
    const frames = opts.animation?.frames ?? 1;
    // Each frame on its own canvas: a stack placed as one would put the bars only around it.
    r = frames > 1 ? stackFrames(Array.from({ length: frames }, (_, i) => placeOnCanvas(frameOf(r, frames, i), canvas, fill))) : placeOnCanvas(r, canvas, fill);
  }
  const animated = opts.animation !== undefined && opts.animation.frames > 1 && spec.animates;
  if (opts.animation && !animated) r = firstFrame(r, opts.animation.frames);
  const p3 = raster.gamut === 'display-p3' && r.channels >= 3;
  // sharp tags without converting only from a 16-bit raster: its processing profile for 16-bit
  // input is P3, so the P3 output transform is the identity (measured: codes kept exactly),
  // and the sRGB one (GIF, which has no colour tag) a conversion from P3.
  if (p3 && !(r.data instanceof Uint16Array)) r = to16Bit(r);
  const alpha = r.channels === 2 || r.channels === 4;
  const deep = r.data instanceof Uint16Array && !p3;
  const pageHeight = animated ? r.height / opts.animation!.frames : undefined;
  let img = sharp(r.data, { raw: { width: r.width, height: r.height, channels: r.channels, ...(pageHeight ? { pageHeight } : {}) } });
  const profile = p3 && opts.format !== 'gif' ? 'p3' : 'srgb';
  const motion = animated ? { loop: opts.animation!.loop, delay: opts.animation!.delays } : {};

  switch (opts.format) {
    case 'png': {
      if (p3) {
        const depth16 = raster.data instanceof Uint16Array;
        return img.toColourspace(depth16 ? 'rgb16' : 'srgb').withIccProfile('p3').png({ compressionLevel: 6, adaptiveFiltering: true }).toBuffer();
      }
      const grey = r.channels <= 2;
      const png = await img
        .toColourspace(grey ? (deep ? 'grey16' : 'b-w') : deep ? 'rgb16' : 'srgb')
        .png({ compressionLevel: 6, adaptiveFiltering: true })
        .toBuffer();
      return tagPngSrgb(png);
    }
    case 'gif':
      if (p3) img = img.withIccProfile('srgb').toColourspace('srgb');
      return img.gif({ ...motion, effort: spec.effort }).toBuffer();
    case 'jpeg':
      if (alpha) img = img.flatten({ background: { r: background.r, g: background.g, b: background.b } });
      // 4:4:4 at high quality keeps fine coloured threads; 4:2:0 below (common practice).
      // Baseline with Huffman tables fitted to the picture, the libjpeg quantisation tables and
      // no trellis, chosen with `npx tsx scripts/encode-jpeg.ts` (four 800 px demo renditions,
      // bytes at equal SSIM): against progressive it took 0.56-0.60x the encoder CPU, for 1.6 %
      // fewer to 3.7 % more bytes. Progressive with optimised scans saved 1.5-4 % for 2-3x the
      // CPU, trellis quantisation at most 4 % for about 3x; the standard Huffman tables cost
      // 3-12 % more bytes than fitted ones. A miss pays the encoder in full, so the cheap one.
      // An 8-bit colour sRGB raster is encoded untagged and tagged after (jpeg-icc.ts: same bytes,
      // without sharp's identity transform); grey and P3 rasters take sharp's own path.
      const settings = { quality, progressive: false, optimiseCoding: true, chromaSubsampling: quality! >= 90 ? '4:4:4' : '4:2:0' } as const;
      if (profile === 'srgb' && !deep && r.channels === 3) return tagJpegSrgb(await img.jpeg(settings).toBuffer());
      return img.withIccProfile(profile).jpeg(settings).toBuffer();
    case 'webp':
      return img.withIccProfile(profile).webp({ quality, effort: spec.effort, ...motion }).toBuffer();
    case 'avif':
      // 4:2:0 at equal SSIM took 0.83x the JPEG's bytes against 0.91x for 4:4:4 (formats.ts).
      return img.withIccProfile(profile).avif({ quality, effort: spec.effort, chromaSubsampling: '4:2:0' }).toBuffer();
  }
}

/** 8 -> 16 bits exactly: v * 65535 / 255 = v * 257. */
function to16Bit(r: PixelRaster): PixelRaster {
  const src = r.data;
  const out = new Uint16Array(src.length);
  for (let i = 0; i < src.length; i++) out[i] = src[i] * 257;
  return { ...r, data: out };
}

/** The top frame of stacked frames (a view, no copy). */
function firstFrame(r: PixelRaster, frames: number): PixelRaster {
  const height = r.height / frames;
  return { ...r, height, data: r.data.subarray(0, r.width * height * r.channels) };
}

/** 16 -> 8 bits, rounded to nearest: v * 255 / 65535 = v / 257. */
function to8Bit(r: PixelRaster): PixelRaster {
  const src = r.data;
  const out = new Uint8Array(src.length);
  for (let i = 0; i < src.length; i++) out[i] = Math.round(src[i] / 257);
  return { ...r, data: out };
}
