import type { Limits } from '../config.js';
import { layoutRendition, type RenditionLayout } from '../core/layout/index.js';
import { makePlan } from '../core/index.js';
import type { AdaptiveFilter, Plan } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import type { RenditionQuery } from '../schemas/rendition.js';

export interface PlannedRendition {
  layout: RenditionLayout;
  plan: Plan;
}

/**
 * The Rendition-Clamped header of a layout the enlargement cap shrank, else undefined: a
 * structured-field dictionary (RFC 8941) of the size asked and the cap applied.
 */
export function clampedHeader(layout: RenditionLayout, q: RenditionQuery, limits: Limits): string | undefined {
  const c = layout.clamped;
  if (!c) return undefined;
  const cap = q.enlarge === 'allowed' ? limits.enlargement.allowed : limits.enlargement.default;
  return `asked-width=${c.width}, asked-height=${c.height}, limit=${num(cap)}`;
}

/** An RFC 8941 decimal: at most three fractional digits, at least one. */
function num(n: number): string {
  const t = String(Math.round(n * 1000) / 1000);
  return t.includes('.') ? t : `${t}.0`;
}

/** Output pixels a query asks for before the source is known (both sides given), else 0. */
export function requestedPixels(q: RenditionQuery): number {
  return q.width !== undefined && q.height !== undefined ? q.width * q.density * q.height * q.density : 0;
}

function refuseOutput(pixels: number, limits: Limits): void {
  if (pixels > limits.maxOutputPixels) {
    throw new FoldwiseError(
      'ERR_OUTPUT_TOO_LARGE',
      `the rendition would have ${Math.round(pixels)} pixels; the limit is ${limits.maxOutputPixels}`,
    );
  }
}

/** Refuses an output side longer than limits.maxDimension (density included). */
function refuseSide(width: number, height: number, limits: Limits): void {
  const side = Math.max(width, height);
  if (side > limits.maxDimension) {
    throw new FoldwiseError(
      'ERR_LIMIT_OUTPUT_DIMENSION',
      `the rendition would be ${Math.round(width)}x${Math.round(height)}; no side may exceed ${limits.maxDimension} pixels`,
    );
  }
}

/** Refuses, before any I/O, a query whose box alone exceeds the output limits. */
export function checkRequestedSize(q: RenditionQuery, limits: Limits): void {
  refuseSide((q.width ?? 0) * q.density, (q.height ?? 0) * q.density, limits);
  refuseOutput(requestedPixels(q), limits);
}

/**
 * Lays the query out on a source of the given size (object-fit / object-position, exact
 * fractional crop) and plans the resample. The output limit covers the canvas too.
 */
export function planRendition(
  source: { width: number; height: number },
  q: RenditionQuery,
  limits: Limits,
  adaptiveSigma?: AdaptiveFilter,
): PlannedRendition {
  const layout = layoutRendition(source, {
    width: q.width,
    height: q.height,
    density: q.density,
    fit: q.fit,
    position: q.position,
    maxScale: q.enlarge === 'allowed' ? limits.enlargement.allowed : limits.enlargement.default,
  });
  const box = layout.canvas ?? { width: layout.targetWidth, height: layout.targetHeight };
  refuseSide(box.width, box.height, limits);
  refuseOutput(box.width * box.height, limits);
  const plan = makePlan({
    sourceWidth: source.width,
    sourceHeight: source.height,
    crop: layout.crop,
    targetWidth: layout.targetWidth,
    targetHeight: layout.targetHeight,
    kernel: q.kernel,
    prefilter: q.prefilter,
    light: q.light,
    adaptiveSigma,
  });
  return { layout, plan };
}
