import type { Limits } from '../config.js';
import type { PixelRaster } from '../core/types.js';
import type { OutputFormat } from '../codec/formats.js';
import { readHeader, type SourceHeader } from '../codec/header.js';
import { negotiateFormat } from '../codec/negotiate.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import type { Lease, Reservation } from '../pool/budget.js';
import { analysisCost, decodeCost, ENCODER_BYTES_PER_PIXEL, outputCost, renditionCost, stagingCost } from '../pool/cost.js';
import type { AdaptivePrefilter } from './prefilter.js';
import { fallbackFormat } from './smallest.js';
import { layoutOf } from './plan.js';
import type { RenderPool } from '../pool/render-pool.js';
import { decodeLimits, type ReadSource, wishOf } from './source.js';
import { STREAM_MIN_PIXELS } from './streamed.js';
import type { StageClock } from './timings.js';

/** What admitting a rendition job needs of the render context. */
export interface AdmitContext {
  pool: RenderPool;
  limits: Limits;
  clock: StageClock;
  signal?: AbortSignal;
  /** Present when prefilter=auto may analyse a new source (streamed: beside the render). */
  adaptive?: AdaptivePrefilter;
}

/** The header of a raster already decoded (the upload hook's ladder). */
export function headerOf(raster: PixelRaster, hasAlpha: boolean): SourceHeader {
  const bytesPerSample = raster.data instanceof Uint16Array ? 2 : 1;
  return { width: raster.width, height: raster.height, channels: raster.channels, bytesPerSample, hasAlpha, format: 'raw' };
}

/** The output format a query will be encoded in, for the estimate (no format: what Accept picks). */
function formatFor(q: RenditionQuery, accept: string | undefined, hasAlpha: boolean): OutputFormat {
  return q.format === undefined ? negotiateFormat(accept, hasAlpha) : q.format;
}

/** A negotiated format is encoded alongside its fallback (smallest.ts): that encoder's bytes too. */
function fallbackEncoder(h: SourceHeader, q: RenditionQuery, pixels: number): number {
  if (q.format !== undefined) return 0; // (an over-estimate when Accept picks a fallback itself)
  return pixels * (h.frames ?? 1) * ENCODER_BYTES_PER_PIXEL[fallbackFormat((h.frames ?? 1) > 1, h.hasAlpha)];
}

/** Output pixels of the query on this source (the canvas when there is one). */
function outputPixels(h: SourceHeader, q: RenditionQuery, limits: Limits): number {
  const layout = layoutOf(h, q, limits);
  const box = layout.canvas ?? { width: layout.targetWidth, height: layout.targetHeight };
  return box.width * box.height;
}

/**
 * Estimates a rendition job's peak bytes from the source's header (read now, no pixel decoded;
 * the limits refuse a source here already) and waits for them in the pool's memory budget.
 * `source` is the read bytes, or the raster already decoded by the caller (then only the
 * staging copy and the output side are new). `place`: the job's reservation, taken before its
 * source was read (RenderPool.enter); the caller releases it when this throws first.
 */
export async function admitRendition(
  ctx: AdmitContext,
  source: ReadSource | { raster: PixelRaster; hasAlpha: boolean },
  q: RenditionQuery,
  accept: string | undefined,
  place?: Reservation,
): Promise<Lease> {
  if ('bytes' in source) {
    const h = await ctx.clock.time('decode', () => readHeader(source.bytes, decodeLimits(ctx.limits), wishOf(q)));
    const streamed = ctx.pool.spool !== null && !h.hasAlpha && (h.frames ?? 1) === 1 && h.width * h.height >= STREAM_MIN_PIXELS;
    const pixels = outputPixels(h, q, ctx.limits);
    // A streamed render with prefilter=auto may analyse the source beside it (streamed.ts): counted
    // whenever it may, since whether the spectrum is kept is known only later (an over-estimate for
    // a further width of an analysed source).
    const analysis = streamed && q.prefilter === 'auto' && ctx.adaptive ? analysisCost(h) : 0;
    const bytes = renditionCost(h, pixels, formatFor(q, accept, h.hasAlpha), streamed) + fallbackEncoder(h, q, pixels) + analysis;
    // Streamed, the source is in a spool file, not in this process's buffers.
    const held = streamed ? 0 : decodeCost(h) + stagingCost(h);
    const frames = (h.frames ?? 1) > 1 ? ` of ${h.frames} frames (pixels counted over every frame)` : '';
    return ctx.pool.admit(bytes, `a ${h.width}x${h.height} ${8 * h.bytesPerSample}-bit ${h.channels}-channel source${frames}`, ctx.signal, held, place);
  }
  const h = headerOf(source.raster, source.hasAlpha);
  const pixels = outputPixels(h, q, ctx.limits);
  const bytes = stagingCost(h) + outputCost(h, pixels, formatFor(q, accept, h.hasAlpha)) + fallbackEncoder(h, q, pixels);
  return ctx.pool.admit(bytes, `a rendition of a ${h.width}x${h.height} source`, ctx.signal, stagingCost(h), place);
}
