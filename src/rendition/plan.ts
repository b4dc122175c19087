import type { Limits } from '../config.js';
import { layoutRendition, type RenditionLayout } from '../core/layout/index.js';
import { makePlan, planResponseOf } from '../core/index.js';
import { adaptiveFilter, type SourceSpectrum } from '../core/risk/index.js';
import type { AdaptiveFilter, Plan } from '../core/types.js';
import { FoldwiseError } from '../errors.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { shrinks } from './prefilter.js';

type Size = { width: number; height: number };

export interface PlannedRendition {
  layout: RenditionLayout;
  plan: Plan;
  /** What prefilter=auto changed for this source (per-axis cut-off factors), if anything. */
  adaptive?: AdaptiveFilter;
}

/**
 * prefilter=auto's decision made in the pool's threads (src/risk/adaptive.ts: from the kept
 * spectrum, or an analysis of the staged source): the filter for the plan given, undefined to
 * leave it as it is, null when no spectrum is at hand yet (the pixels are needed first).
 */
export interface AdaptiveDecision {
  decide(plan: Plan): Promise<AdaptiveFilter | undefined | null>;
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
 * fractional crop), refused past the output limits (the canvas included): what admission
 * needs to know of a rendition, before any plan.
 */
export function layoutOf(source: Size, q: RenditionQuery, limits: Limits): RenditionLayout {
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
  return layout;
}

/**
 * The layout (layoutOf) and the resample plan of a rendition. With prefilter=auto and a plan
 * that shrinks an axis, it asks `adapt` for the content-adaptive filter and plans again with
 * it: `adapt` is either the source's spectrum at hand (the visibility model decides here,
 * core/risk: adaptiveFilter) or, for the render paths, an AdaptiveDecision whose decision runs
 * in the pool (then the answer is a promise). The one place a rendition is planned: the
 * in-memory and streamed render paths and the alias-risk report call it, so the report
 * describes exactly the plan a render uses.
 *
 * Returns (or resolves to) null only when `adapt` may answer that no spectrum is at hand
 * (the streamed path before decode) and did: the plan needs the decoded pixels first.
 */
export function planRendition(source: Size, q: RenditionQuery, limits: Limits, spectrum?: () => SourceSpectrum): PlannedRendition;
export function planRendition(source: Size, q: RenditionQuery, limits: Limits, spectrum?: () => SourceSpectrum | undefined): PlannedRendition | null;
export function planRendition(source: Size, q: RenditionQuery, limits: Limits, adapt: AdaptiveDecision): Promise<PlannedRendition | null>;
export function planRendition(
  source: Size,
  q: RenditionQuery,
  limits: Limits,
  adapt?: (() => SourceSpectrum | undefined) | AdaptiveDecision,
): PlannedRendition | null | Promise<PlannedRendition | null> {
  const layout = layoutOf(source, q, limits);
  const planOf = (adaptiveSigma?: AdaptiveFilter) =>
    makePlan({
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
  const plan = planOf();
  const adapted = (filter: AdaptiveFilter | undefined | null): PlannedRendition | null =>
    filter === null ? null : filter ? { layout, plan: planOf(filter), adaptive: filter } : { layout, plan };
  // A plan that shrinks neither axis cannot fold anything: it never costs an analysis.
  const asks = adapt !== undefined && q.prefilter === 'auto' && shrinks(plan);
  if (typeof adapt === 'object') return asks ? adapt.decide(plan).then(adapted) : Promise.resolve({ layout, plan });
  if (!asks) return { layout, plan };
  const analysed = adapt();
  return analysed ? adapted(adaptiveFilter(analysed, plan, planResponseOf(plan))) : null;
}
