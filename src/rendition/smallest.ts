import type { PixelRaster } from '../core/types.js';
import { type EncodeOptions, encodeImage } from '../codec/encode.js';
import type { OutputFormat } from '../codec/formats.js';

/** The format every client decodes, which a negotiated format must beat: GIF, PNG (alpha) or JPEG. */
export function fallbackFormat(animated: boolean, hasAlpha: boolean): OutputFormat {
  return animated ? 'gif' : hasAlpha ? 'png' : 'jpeg';
}

/** An encoded rendition and the format it ended in. */
export interface Encoded {
  body: Buffer;
  format: OutputFormat;
}

/**
 * Encodes `raster` in `format`. When the format was negotiated (the request named none) and is
 * WebP or AVIF, the fallback is encoded alongside (concurrently: libvips runs each on its
 * own thread) and the smaller answer wins, the fallback on a tie: a negotiated format must
 * save bytes, never spend them (the demo's twill came out 7 % larger as WebP than as JPEG).
 * The choice is cached with the rendition, under the key of the Accept header's choices, so
 * it is made once per rendition; the answer keeps `Vary: Accept`.
 */
export async function encodeSmallest(
  raster: PixelRaster,
  opts: Omit<EncodeOptions, 'format'>,
  format: OutputFormat,
  negotiated: boolean,
  fallback: OutputFormat,
): Promise<Encoded> {
  // Only WebP and AVIF are weighed: a client that accepts only PNG (say) gets PNG, not a JPEG.
  const weighed = negotiated && format !== fallback && (format === 'webp' || format === 'avif');
  if (!weighed) return { body: await encodeImage(raster, { ...opts, format }), format };
  const [body, plain] = await Promise.all([encodeImage(raster, { ...opts, format }), encodeImage(raster, { ...opts, format: fallback })]);
  return body.length < plain.length ? { body, format } : { body: plain, format: fallback };
}
