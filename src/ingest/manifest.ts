/**
 * The ingest manifest: everything a CMS needs to publish one picture as a responsive image.
 */
import type { z } from 'zod';
import type { manifestSchema } from '../schemas/ingest.js';
import { buildSrcset, suggestSizes } from './srcset.js';

export type Manifest = z.output<typeof manifestSchema>;
export type ManifestRendition = Manifest['renditions'][number];

/**
 * Assembles the manifest. Renditions are ordered by format (as asked), then width; the srcset
 * of each format lists its renditions by ascending width.
 */
export function assembleManifest(
  source: Manifest['source'],
  formats: readonly string[],
  renditions: readonly ManifestRendition[],
  warnings: readonly string[],
): Manifest {
  const rank = (f: string): number => formats.indexOf(f);
  const ordered = [...renditions].sort((a, b) => rank(a.format) - rank(b.format) || a.width - b.width);
  const srcset: Record<string, string> = {};
  for (const format of formats) {
    const own = ordered.filter((r) => r.format === format);
    if (own.length > 0) srcset[format] = buildSrcset(own);
  }
  const largest = ordered.reduce((m, r) => Math.max(m, r.width), 0);
  return { source, renditions: ordered, srcset, sizes: suggestSizes(largest || source.width), warnings: [...warnings] };
}
