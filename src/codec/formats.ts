/**
 * The formats foldwise reads and writes, as data. Encoders, content negotiation, the folder
 * origin's listing and the HTTP layer all read this table instead of repeating its facts.
 */

export type OutputFormat = 'jpeg' | 'png' | 'webp' | 'avif' | 'gif';

export interface OutputFormatSpec {
  name: OutputFormat;
  contentType: string;
  /** Used when the request names no quality; undefined where the format is lossless. */
  defaultQuality: number | undefined;
  /** Whether the format can carry an alpha channel. */
  hasAlpha: boolean;
  /**
   * Encoder effort (CPU spent searching for a smaller file), chosen by measurement with
   * `npx tsx scripts/encode-effort.ts 5 2` (1200x900 renditions of two demo pictures, time
   * and bytes as ratios to a JPEG q82 encode in the same run):
   * - AVIF effort 0 took 3.7-4.1x the JPEG time on both pictures; effort 1 saved 13-26 % of
   *   bytes but took 4.3x on one picture and 22x on the other, effort 2 17-32x. A miss must
   *   have a predictable cost, so 0.
   * - WebP effort 2 took 3.9-4.7x with bytes within 1-7 % of effort 6 (7-35x), so 2.
   * Then quality and chroma at equal SSIM to the JPEG (`npx tsx scripts/encode-formats.ts`,
   * 640 px renditions of four demo pictures and four skimage photographs, medians): AVIF
   * reaches the JPEG's SSIM at q72, 0.83x its bytes with 4:2:0 chroma (0.91x with 4:4:4, for
   * more time), so q72 and 4:2:0. WebP needs q88-90 and then 1.14-1.23x the JPEG's bytes at
   * every effort: it never saves bytes at equal quality here. It keeps q80 (0.62-1.12x the
   * JPEG's bytes, a lower SSIM) for clients that ask for it, and a negotiated WebP that comes
   * out larger than the JPEG answers the JPEG (rendition/smallest.ts). Smart subsampling
   * changed bytes by under 1 % for 1.8x the time, so plain 4:2:0.
   */
  effort: number | undefined;
  /** Whether the format can carry an animation (sharp writes WebP's and GIF's). */
  animates: boolean;
  /** Bits per sample the encoder can write. */
  depths: readonly (8 | 16)[];
  extension: string;
}

export const formatSpecs: Readonly<Record<OutputFormat, OutputFormatSpec>> = {
  jpeg: {
    name: 'jpeg',
    contentType: 'image/jpeg',
    defaultQuality: 82,
    hasAlpha: false,
    effort: undefined,
    animates: false,
    depths: [8],
    extension: 'jpg',
  },
  png: {
    name: 'png',
    contentType: 'image/png',
    defaultQuality: undefined,
    hasAlpha: true,
    effort: undefined,
    animates: false,
    depths: [8, 16],
    extension: 'png',
  },
  webp: {
    name: 'webp',
    contentType: 'image/webp',
    defaultQuality: 80,
    hasAlpha: true,
    effort: 2,
    animates: true,
    depths: [8],
    extension: 'webp',
  },
  avif: {
    name: 'avif',
    contentType: 'image/avif',
    // Equal SSIM to JPEG q82 (scripts/encode-formats.ts; see `effort` above).
    defaultQuality: 72,
    hasAlpha: true,
    effort: 0,
    animates: false,
    depths: [8],
    extension: 'avif',
  },
  gif: {
    name: 'gif',
    contentType: 'image/gif',
    defaultQuality: undefined,
    hasAlpha: true,
    // libimagequant's and cgif's effort through sharp (1..10, sharp's default 7; common practice).
    effort: 7,
    animates: true,
    depths: [8],
    extension: 'gif',
  },
};

/**
 * Source formats the decoder accepts, by the name sharp's metadata() reports, with the file
 * extensions the folder origin lists. Everything else is refused: SVG and PDF because they
 * are programs that render (external references, unbounded work), the rest because no caller
 * of an image service needs them.
 */
export const sourceFormats: Readonly<Record<string, { extensions: readonly string[] }>> = {
  jpeg: { extensions: ['jpg', 'jpeg'] },
  png: { extensions: ['png'] },
  webp: { extensions: ['webp'] },
  gif: { extensions: ['gif'] },
  heif: { extensions: ['avif'] },
  tiff: { extensions: ['tif', 'tiff'] },
};

const sourceExtensions = new Set(Object.values(sourceFormats).flatMap((f) => f.extensions));

/** True when a file name ends in an extension of a source format (case-insensitive). */
export function hasSourceExtension(fileName: string): boolean {
  const dot = fileName.lastIndexOf('.');
  return dot > 0 && sourceExtensions.has(fileName.slice(dot + 1).toLowerCase());
}
