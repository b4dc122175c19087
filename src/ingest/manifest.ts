/**
 * The ingest manifest: everything a CMS needs to publish one picture as a responsive image.
 */
import type { z } from 'zod';
import type { IngestFormat, manifestSchema } from '../schemas/ingest.js';
import { pickFallback, pictureHtml } from './html.js';
import { buildSrcset, suggestSizes } from './srcset.js';

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
  const largest = ordered.reduce((m, r) => Math.max(m, r.width), 0);
  const sizes = suggestSizes(largest || source.width);
  const fallback = pickFallback(ordered.filter((r) => r.format === formats[formats.length - 1]));
  const src = fallback?.url ?? '';
  const html = fallback ? pictureHtml({ formats, srcset, sizes, fallback }) : '';
  return { source, renditions: ordered, srcset, sizes, src, html, warnings: [...warnings] };
}
