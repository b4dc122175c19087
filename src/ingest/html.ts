/**
 * A ready `<picture>` element for a manifest: one `<source>` per modern format and an `<img>`
 * in the last (fallback) format, so a CMS can paste the answer into a page as it is.
 * Element and attribute syntax per the HTML Living Standard (picture, source, img).
 */
import { formatSpecs, type OutputFormat } from '../codec/formats.js';

export interface PictureInput {
  formats: readonly OutputFormat[];
  srcset: Record<string, string>;
  sizes: string;
  fallback: { url: string; width: number; height: number };
}

/** Attribute values are double-quoted: & and " must be escaped (HTML Living Standard, 13.1.2.3). */
function attr(value: string): string {
  return value.replace(/&/g, '&amp;').replace(/"/g, '&quot;');
}

/**
 * The default `src`: the widest rendition up to 1080 px (a common content width on laptops,
 * common practice), else the narrowest; browsers that read `srcset` choose for themselves.
 */
export function pickFallback<T extends { width: number }>(renditions: readonly T[]): T | undefined {
  const sorted = [...renditions].sort((a, b) => a.width - b.width);
  return sorted.filter((r) => r.width <= 1080).at(-1) ?? sorted[0];
}

export function pictureHtml(p: PictureInput): string {
  const last = p.formats[p.formats.length - 1];
  const sources = p.formats
    .slice(0, -1)
    .filter((f) => p.srcset[f])
    .map((f) => `  <source type="${formatSpecs[f].contentType}" srcset="${attr(p.srcset[f])}" sizes="${attr(p.sizes)}">`);
  const img =
    `  <img src="${attr(p.fallback.url)}" srcset="${attr(p.srcset[last] ?? '')}" sizes="${attr(p.sizes)}"` +
    ` width="${p.fallback.width}" height="${p.fallback.height}" alt="">`;
  return ['<picture>', ...sources, img, '</picture>'].join('\n');
}
