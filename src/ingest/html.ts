/**
 * A ready `<picture>` element for a manifest: one `<source>` per modern format and an `<img>`
 * in the last (fallback) format, so a CMS can paste the answer into a page as it is.
 * Element and attribute syntax per the HTML Living Standard (picture, source, img; the
 * `loading` and `decoding` attributes; `width`/`height` as the intrinsic aspect ratio that
 * reserves the box before the image arrives, "Dimension attributes" and the rendering
 * section's mapping of them to aspect-ratio).
 */
import { formatSpecs, type OutputFormat } from '../codec/formats.js';

export interface PictureInput {
  formats: readonly OutputFormat[];
  srcset: Record<string, string>;
  sizes: string;
  /** The default `src`. */
  fallback: { url: string };
  /** The picture's size at density 1 (the largest rendition): its aspect ratio reserves the box. */
  box: { width: number; height: number };
  /** Shown in the reserved box until the image paints over it (the placeholder variant). */
  placeholder?: { dataUri: string; mean: string };
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

/**
 * The inline style: never wider than its column, the height following the width through the
 * aspect ratio of `width`/`height` (so the box is reserved: no layout shift). The placeholder
 * variant paints the mean colour, then the tiny rendition stretched over the box, under the
 * image; the image covers both once it has loaded (opaque pictures; a transparent one would
 * show them through).
 */
function style(p: PictureInput): string {
  const base = 'max-width:100%;height:auto';
  if (!p.placeholder) return base;
  const { dataUri, mean } = p.placeholder;
  return `${base};background:${mean} url(${dataUri}) 0 0/100% 100% no-repeat`;
}

export function pictureHtml(p: PictureInput): string {
  const last = p.formats[p.formats.length - 1];
  const sizes = attr(p.sizes);
  const sources = p.formats
    .slice(0, -1)
    .filter((f) => p.srcset[f])
    .map((f) => `  <source type="${formatSpecs[f].contentType}" srcset="${attr(p.srcset[f])}" sizes="${sizes}">`);
  const img =
    `  <img src="${attr(p.fallback.url)}" srcset="${attr(p.srcset[last] ?? '')}" sizes="${sizes}"` +
    ` width="${p.box.width}" height="${p.box.height}" loading="lazy" decoding="async"` +
    ` style="${attr(style(p))}" alt="">`;
  return ['<picture>', ...sources, img, '</picture>'].join('\n');
}
