/**
 * The ingest manifest: everything a CMS needs to publish one picture as a responsive image.
 */
import type { z } from 'zod';
import type { IngestFormat, manifestSchema } from '../schemas/ingest.js';
import { pickFallback, pictureHtml } from './html.js';
import type { Placeholder } from './placeholder.js';
import { buildSrcset } from './srcset.js';

/** The html's sizes when the caller names none: the picture spans the viewport (issue 17). */
export const defaultSizes = '100vw';

export type Manifest = z.output<typeof manifestSchema>;
export type ManifestRendition = Manifest['renditions'][number];

/**
 * Assembles the manifest. Renditions are ordered by format (as asked), then width; the srcset
 * of each format lists its renditions by ascending width.
 */
export function assembleManifest(
  source: Manifest['source'],
  formats: readonly IngestFormat[],
  renditions: readonly ManifestRendition[],
  warnings: readonly string[],
  markup: { sizes?: string; placeholder: Placeholder; transparent: boolean },
): Manifest {
  const rank = (f: string): number => formats.indexOf(f as IngestFormat);
  const ordered = [...renditions]
    .sort((a, b) => rank(a.format) - rank(b.format) || a.width - b.width)
    // Three decimals say all a score can (its levels are coarser still); the rest is noise.
    .map((r) => ({ ...r, risk: { ...r.risk, score: Math.round(r.risk.score * 1000) / 1000 } }));
  const srcset: Record<string, string> = {};
  for (const format of formats) {
    const own = ordered.filter((r) => r.format === format);
    if (own.length > 0) srcset[format] = buildSrcset(own);
  }
  const { placeholder } = markup;
  const sizes = markup.sizes ?? defaultSizes;
  const last = ordered.filter((r) => r.format === formats[formats.length - 1]);
  const fallback = pickFallback(last);
  // The box: the widest rendition, whose aspect ratio is the source's to within its rounding.
  const widest = last.at(-1) ?? { width: source.width, height: source.height };
  const picture = fallback && { formats, srcset, sizes, fallback, box: { width: widest.width, height: widest.height } };
  const html = picture ? pictureHtml(picture) : '';
  // A transparent picture would show the placeholder through itself once loaded: no variant.
  const htmlWithPlaceholder = picture && !markup.transparent ? pictureHtml({ ...picture, placeholder }) : html;
  const src = fallback?.url ?? '';
  return { source, renditions: ordered, srcset, sizes, src, html, placeholder, htmlWithPlaceholder, warnings: [...warnings] };
}
