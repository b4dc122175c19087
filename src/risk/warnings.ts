/**
 * Warnings in plain words for an editor: which width, where on the picture, what it will look
 * like, and what avoids it.
 */
import { describeRegion, type RiskGrid } from './regions.js';

export type RiskLevel = 'low' | 'moderate' | 'high';

/** What the warning writer needs to know about one width of the ladder. */
export interface WidthRisk {
  width: number;
  level: RiskLevel;
  score: number;
  grid: RiskGrid;
  /** True when the strongest false pattern is a spectral line (stripes, weaves), not broadband detail. */
  periodic: boolean;
  /** The strongest false pattern in plain words (the alias-risk report's description). */
  pattern?: string;
  /** The report's first advice: the query change, what it does, and what it costs. */
  advice?: { change: string; effect: string; cost: string };
  /** Why prefilter=auto left it in place, when it did (the report's words). */
  left?: string;
  /** Older callers: a prefilter sigma (source px) that brings the folded energy under -40 dB. */
  remedySigma?: number;
}

function symptom(r: WidthRisk): string {
  if (r.pattern) return r.pattern;
  // Periodic energy folds to a false low frequency; broadband to jagged edges (Shannon 1949).
  return r.periodic ? 'shows false bands (fine periodic pattern)' : 'shows jagged edges and sparkle (fine detail)';
}

/**
 * One sentence per width with a false pattern a viewer would see, smallest width first, in
 * the alias-risk report's words (the same visibility model). The remedy never changes the
 * width: a thumbnail stays a thumbnail.
 */
export function writeWarnings(risks: readonly WidthRisk[]): string[] {
  const sorted = [...risks].sort((a, b) => a.width - b.width);
  const out: string[] = [];
  for (const r of sorted) {
    if (r.level === 'low') continue;
    const where = describeRegion(r.grid) ?? 'the whole picture';
    const verb = r.level === 'high' ? 'will show' : 'may show, on close inspection,';
    const remedy = r.advice
      ? `; ${r.advice.change} ${r.advice.effect}: ${r.advice.cost}`
      : r.left
        ? `; ${r.left}`
        : '';
    out.push(`at ${r.width} px ${where} ${verb} a pattern that ${symptom(r)}${remedy}`);
  }
  return out;
}
