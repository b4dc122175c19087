/**
 * The manifest's lazy-loading placeholder: a rendition a few dozen pixels wide from the
 * rendition pipeline itself (linear light, prefilter=auto, so it neither darkens contrast nor
 * aliases fine patterns into false ones), inlined as a data URI, and the source's mean colour
 * in linear light.
 */
import { webpWithoutIcc } from '../codec/webp-icc.js';
import { frameOf, hexColour, linearMeanColour } from '../core/index.js';
import { renderRendition, type RenderContext } from '../rendition/service.js';
import type { LoadedSource } from '../rendition/source.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { RawQuery } from '../schemas/query.js';
import { heightFor } from './ladder.js';

/**
 * 32 px wide: enough for the broad shapes and colours a stretched, blurred preview shows; a
 * few hundred bytes as lossy WebP (README states the figures measured on the demo pictures).
 * WebP: every browser current since 2020 decodes it (common practice).
 */
export const placeholderWidth = 32;
const placeholderQuality = 50;

export interface Placeholder {
  dataUri: string;
  width: number;
  height: number;
  bytes: number;
  mean: string;
}

/** Renders (or finds in the cache) the placeholder of a decoded source. */
export async function makePlaceholder(
  render: RenderContext,
  sourceKey: string,
  loaded: LoadedSource,
  parse: (raw: RawQuery) => RenditionQuery,
): Promise<Placeholder> {
  const { identity, decoded } = loaded;
  const frames = decoded.animation?.frames ?? 1;
  // An animation's placeholder is its first frame as a still (still=1, so its cache entry is
  // not the animated rendition's), rendered from a view of the decoded frames: no second decode.
  const { animation: _frames, ...still } = decoded;
  const raster = frames > 1 ? frameOf(decoded.raster, frames, 0) : decoded.raster;
  const given: LoadedSource = frames > 1 ? { identity, decoded: { ...still, raster, wish: { ...decoded.wish, frames: 0 } } } : loaded;
  // Never wider than the source (the default enlargement cap would clamp it anyway).
  const width = Math.min(placeholderWidth, raster.width);
  const query = parse({ width: String(width), format: 'webp', quality: String(placeholderQuality), ...(frames > 1 ? { still: '1' } : {}) });
  const r = await renderRendition({ ...render, decoded: given, admitted: true }, sourceKey, query);
  // The rendition carries an sRGB profile (~500 bytes); inline, untagged sRGB says the same.
  // A Display P3 rendition keeps its profile: untagged, its colours would be read as sRGB.
  const body = raster.gamut ? r.entry.body : webpWithoutIcc(r.entry.body);
  return {
    dataUri: `data:image/webp;base64,${body.toString('base64')}`,
    width,
    height: heightFor(raster.width, raster.height, width),
    bytes: body.length,
    mean: hexColour(linearMeanColour(raster)),
  };
}
