import type { IncomingHttpHeaders } from 'node:http';
import { FoldwiseError } from '../../errors.js';
import type { RawQuery } from '../../schemas/query.js';

/**
 * Client Hints for renditions. The mechanism is RFC 8942 (a server lists in `Accept-CH` the
 * hints it uses; a browser that supports them sends them on later requests to that origin).
 * The two hints, as the Responsive Image Client Hints draft defines them (from memory):
 * `Sec-CH-DPR`, the device pixel ratio as a decimal; `Sec-CH-Width`, the width the image is
 * laid out at (its `sizes` slot) in device pixels. Only Chromium-based browsers send them,
 * and only after the page opted in; Safari and Firefox send none (CHECKS.md, Web platform).
 *
 * `width=hinted` asks for the width the hints give, with `slot` the picture's width in CSS px
 * (what its `sizes` says): Sec-CH-Width when sent; else slot x Sec-CH-DPR; else (no hints)
 * slot x density. A width from a header is rounded up to the next of a fixed ladder of
 * widths 10 % apart, so headers a client chooses freely make at most 58 renditions per
 * source and query (a cache-busting bound that holds for signed URLs too); a width from the
 * URL alone is exact.
 */
export const acceptCh = 'Sec-CH-DPR, Sec-CH-Width';
/** What a hinted answer depends on: both hints (Sec-CH-DPR matters exactly when Sec-CH-Width is absent). */
export const hintedVary = 'Sec-CH-Width, Sec-CH-DPR';

export type HintSource = 'sec-ch-width' | 'sec-ch-dpr' | 'fallback';

export interface HintedQuery {
  /** The raw query with `width` resolved to device pixels and `slot` (and `density`) gone. */
  raw: RawQuery;
  width: number;
  from: HintSource;
}

/** 32, then each 10 % wider (rounded up), to past 8192: 58 widths. */
export const hintSteps: readonly number[] = (() => {
  const steps = [32];
  while (steps[steps.length - 1] < 8192) steps.push(Math.ceil(steps[steps.length - 1] * 1.1));
  return steps;
})();

/** The smallest ladder width at least `w`, at most `max`. */
export function snapHinted(w: number, max: number): number {
  return Math.min(max, hintSteps.find((s) => s >= w) ?? max);
}

export function isHinted(raw: RawQuery): boolean {
  return raw.width === 'hinted';
}

function header(headers: IncomingHttpHeaders, name: string): string | undefined {
  const v = headers[name];
  return typeof v === 'string' ? v.trim() : undefined;
}

/** A positive decimal number, else undefined (a malformed hint counts as absent). */
function number(text: string | undefined, pattern: RegExp): number | undefined {
  if (text === undefined || !pattern.test(text)) return undefined;
  const n = Number(text);
  return n > 0 ? n : undefined;
}

function positiveOf(raw: RawQuery, name: string, pattern: RegExp, min: number, max: number): number | undefined {
  const v = raw[name];
  if (v === undefined) return undefined;
  const n = typeof v === 'string' && pattern.test(v) ? Number(v) : NaN;
  if (!(n >= min && n <= max)) throw new FoldwiseError('ERR_PARAM_INVALID', `${name} must be a number from ${min} to ${max}`);
  return n;
}

/** Resolves `width=hinted` from the request's hints (see above). */
export function resolveHinted(raw: RawQuery, headers: IncomingHttpHeaders, maxDimension: number): HintedQuery {
  const slot = positiveOf(raw, 'slot', /^\d{1,9}$/, 1, maxDimension);
  if (slot === undefined) throw new FoldwiseError('ERR_PARAM_MISSING', 'width=hinted needs slot: the picture\'s width in CSS px (as its sizes says)');
  if (raw.height !== undefined) {
    throw new FoldwiseError('ERR_PARAM_INVALID', 'width=hinted takes no height: the height follows the source\'s aspect ratio');
  }
  const density = positiveOf(raw, 'density', /^\d{1,6}(\.\d{1,6})?$/, 0.5, 4) ?? 1;
  const { slot: _slot, density: _density, ...rest } = raw;
  const hintWidth = number(header(headers, 'sec-ch-width'), /^\d{1,9}$/);
  // Sec-CH-DPR is clamped to density's own range (0.5..4).
  const dpr = number(header(headers, 'sec-ch-dpr'), /^\d{1,3}(\.\d{1,9})?$/);
  let width: number;
  let from: HintSource;
  if (hintWidth !== undefined) [width, from] = [snapHinted(hintWidth, maxDimension), 'sec-ch-width'];
  else if (dpr !== undefined) [width, from] = [snapHinted(slot * Math.min(4, Math.max(0.5, dpr)), maxDimension), 'sec-ch-dpr'];
  else [width, from] = [Math.min(maxDimension, Math.max(1, Math.round(slot * density))), 'fallback'];
  return { raw: { ...rest, width: String(width) }, width, from };
}
