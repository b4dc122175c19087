/**
 * Advice with its price: what a change removes, what it costs the picture, and from which
 * width the pattern shows cleanly. A recommendation never changes the rendition's width (a
 * thumbnail stays a thumbnail): the width is said as a fact, for the reader to weigh.
 */
import type { Plan } from '../types.js';
import type { SourceSpectrum } from '../spectrum/index.js';
import { VISIBLE_MARGIN } from './levels.js';
import { CUT_MIN } from './cutoff.js';
import type { VisiblePattern } from './visibility.js';

export interface Advice {
  /** The query change, e.g. `prefilter=auto`; empty when nothing in the query can help. */
  change: string;
  /** What it does to the false pattern. */
  effect: string;
  /** What it costs the picture, in plain words. */
  cost: string;
}

/** A line passes cleanly at or below this fraction of the new Nyquist (the kernel keeps >= 85 %). */
export const CLEAN_FRACTION = 0.8;

/**
 * The smallest rendition width (output px, same aspect) at which a line of source frequency f
 * sits at or below CLEAN_FRACTION of the new Nyquist on both axes.
 */
export function cleanWidth(plan: Plan, f: { fx: number; fy: number }): number {
  const limit = 0.5 * CLEAN_FRACTION;
  const wx = (plan.crop.width * Math.abs(f.fx)) / limit;
  const hy = (plan.crop.height * Math.abs(f.fy)) / limit;
  return Math.ceil(Math.max(wx, (hy * plan.targetWidth) / plan.targetHeight));
}

const periodOf = (f: { fx: number; fy: number }) => 1 / Math.max(1e-9, Math.hypot(f.fx, f.fy));

/** What the pattern is, for prose: "stripes 13.2 source px apart". */
export function lineWords(p: VisiblePattern): string {
  return `the stripes ${periodOf(p.frequency).toFixed(1)} source px apart`;
}

/** Advice for the strongest visible pattern of a planned rendition (empty when none shows). */
export function adviceFor(plan: Plan, visible: VisiblePattern[], auto: boolean, capped: boolean): Advice[] {
  const top = visible[0];
  if (!top) return [];
  const out: Advice[] = [];
  const width = top.source === 'line' ? cleanWidth(plan, top.frequency) : undefined;
  const from = width !== undefined ? `; they show cleanly from ${width} px wide` : '';
  const what = top.source === 'line' ? lineWords(top) : 'the finest detail (grain, thread texture)';
  if (!auto) {
    out.push({
      change: 'prefilter=auto',
      effect: 'removes the false bands by lowering the cut-off only on the axis that needs it',
      cost: `${what} become an even tone of the cloth's colour at this width${from}`,
    });
  } else if (capped) {
    const sigma = (0.5 * Math.max(plan.x.scale, plan.y.scale)).toFixed(2);
    out.push({
      change: `prefilter=${sigma}`,
      effect: `a Gaussian of sigma ${sigma} source px removes what prefilter=auto may not (it stops at ${CUT_MIN}x the cut-off)`,
      cost: `softens the whole rendition, not only ${what}${from}`,
    });
  }
  if (plan.light === 'encoded') {
    out.push({
      change: 'light=linear',
      effect: 'averages light as the eye does, so fine patterns average to their true tone',
      cost: 'high-contrast weaves look lighter and less saturated, as the cloth does from further away',
    });
  }
  return out;
}

/** Power of the spectrum cell nearest (fx, fy), centred order (welch.ts). */
function cellPower(spec: SourceSpectrum, fx: number, fy: number): number {
  const n = spec.tileSize;
  const i = Math.round(fx * n + n / 2);
  const j = Math.round(fy * n + n / 2);
  return i >= 0 && i < n && j >= 0 && j < n ? spec.power[j * n + i] : 0;
}

/** The line's spacing k times wider (k = 2..4) when the source holds it at least as strongly: its fundamental. */
function fundamentalOf(spec: SourceSpectrum, f: { fx: number; fy: number }): number | undefined {
  const own = cellPower(spec, f.fx, f.fy);
  for (let k = 4; k >= 2; k--) if (cellPower(spec, f.fx / k, f.fy / k) >= own) return k / Math.hypot(f.fx, f.fy);
  return undefined;
}

/**
 * What prefilter=auto's lowered cut-off evened out, for the reason: the coarsest line that would
 * show without it (margin over the share the plan passes >= 1), and the width from which it shows
 * cleanly. A harmonic of coarser stripes is named as those stripes' sharpest detail.
 */
export function evenedWords(spec: SourceSpectrum, plan: Plan, patterns: VisiblePattern[]): string {
  const size = (p: VisiblePattern) => Math.hypot(p.frequency.fx, p.frequency.fy);
  let best: VisiblePattern | undefined;
  for (const p of patterns) {
    if (p.source !== 'line' || p.kind === 'clean' || !(p.passed > 1e-6 && p.passed < 0.5)) continue;
    if (p.margin / p.passed >= VISIBLE_MARGIN && (!best || size(p) < size(best))) best = p;
  }
  if (!best) return '';
  const width = cleanWidth(plan, best.frequency);
  const base = fundamentalOf(spec, best.frequency);
  if (base !== undefined) {
    return `: the sharpest detail of the stripes ${base.toFixed(1)} source px apart is evened out at this width (the stripes stay); it shows cleanly from ${width} px wide`;
  }
  return `: ${lineWords(best)} become an even tone at this width; they show cleanly from ${width} px wide`;
}
