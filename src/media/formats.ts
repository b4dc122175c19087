/**
 * The formats foldwise reads and writes, as data. Encoders, content negotiation, the folder
 * origin's listing and the HTTP layer all read this table instead of repeating its facts.
 */

export type OutputFormat = 'jpeg' | 'png' | 'webp' | 'avif';

export interface OutputFormatSpec {
  name: OutputFormat;
  contentType: string;
  /** Used when the request names no quality; undefined where the format is lossless. */
  defaultQuality: number | undefined;
  /** Whether the format can carry an alpha channel. */
  hasAlpha: boolean;
  /**
   * Encoder effort (CPU time spent searching for a smaller file). Chosen by measurement:
   * see scripts/encode-effort.ts. AVIF 2 of 0..9 and WebP 2 of 0..6 keep a 1600x1000
   * encode in the same order of time as the resample itself; higher levels buy a few per cent
   * of bytes for several times the CPU.
   */
  effort: number | undefined;
  /** Bits per sample the encoder can write. */
  depths: readonly (8 | 16)[];
  extension: string;
}

export const outputFormats: Readonly<Record<OutputFormat, OutputFormatSpec>> = {
  jpeg: {
    name: 'jpeg',
    contentType: 'image/jpeg',
    defaultQuality: 82,
    hasAlpha: false,
    effort: undefined,
    depths: [8],
    extension: 'jpg',
  },
  png: {
    name: 'png',
    contentType: 'image/png',
    defaultQuality: undefined,
    hasAlpha: true,
    effort: undefined,
    depths: [8, 16],
    extension: 'png',
  },
  webp: {
    name: 'webp',
    contentType: 'image/webp',
    defaultQuality: 80,
    hasAlpha: true,
    effort: 2,
    depths: [8],
    extension: 'webp',
  },
  avif: {
    name: 'avif',
    contentType: 'image/avif',
    // AVIF's quality scale runs lower than JPEG's for the same look (common practice).
    defaultQuality: 55,
    hasAlpha: true,
    effort: 2,
    depths: [8],
    extension: 'avif',
  },
};

export const outputFormatNames = Object.keys(outputFormats) as OutputFormat[];

export function isOutputFormat(name: string): name is OutputFormat {
  return Object.hasOwn(outputFormats, name);
}

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
