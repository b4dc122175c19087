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
  /** True when the folding energy is a periodic pattern (stripes, weaves), not broadband detail. */
  periodic: boolean;
  /** A prefilter sigma (source px) that brings this width down to low risk, when one is known. */
  remedySigma?: number;
}

function symptom(periodic: boolean): string {
  // Periodic energy above the new Nyquist folds to a false low frequency (moiré); broadband
  // energy folds to jagged edges and shimmer (Shannon 1949; common practice for the words).
  return periodic ? 'moiré (fine periodic pattern)' : 'jagged edges and sparkle (fine detail)';
}

/** Rounded up to a tenth, so the suggested value is at least the recommended blur. */
function sigmaText(sigma: number): string {
  return (Math.ceil(sigma * 10) / 10).toFixed(1);
}

/** One sentence per width that is not low risk, smallest width first. */
export function writeWarnings(risks: readonly WidthRisk[]): string[] {
  const sorted = [...risks].sort((a, b) => a.width - b.width);
  const out: string[] = [];
  for (const [i, r] of sorted.entries()) {
    if (r.level === 'low') continue;
    const where = describeRegion(r.grid) ?? 'the whole picture';
    const verb = r.level === 'high' ? 'will show' : 'may show';
    const safer = sorted.slice(i + 1).find((s) => s.level === 'low');
    const sigma = r.remedySigma !== undefined && r.remedySigma > 0 ? `prefilter=${sigmaText(r.remedySigma)}` : undefined;
    const fixes = [safer ? `${safer.width} px` : undefined, sigma]
      .filter((f): f is string => f !== undefined);
    const remedy = fixes.length > 0 ? `; ${fixes.join(' or ')} avoids it` : '';
    out.push(`at ${r.width} px ${where} ${verb} ${symptom(r.periodic)}${remedy}`);
  }
  return out;
}
