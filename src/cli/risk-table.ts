/**
 * The readable form of one alias-risk report for `foldwise risk`: aligned label/value lines,
 * the false patterns a viewer could see and the peaks as small tables, the advice with its
 * cost, and the per-region margins as digits 0..9 (a text heat map in threshold units).
 */
import type { RiskReport } from '../core/risk/index.js';

export interface RiskView {
  file: string;
  source: { width: number; height: number };
  target: { width: number; height: number };
  plan: string;
  report: RiskReport;
  warnings: string[];
}

const pct = (v: number) => `${(100 * v).toFixed(v < 0.001 ? 3 : 1)} %`;
const pair = (a: number, b: number, digits: number) => `${a.toFixed(digits)} x ${b.toFixed(digits)}`;
/** Three decimals, without a "-0.000". */
const f3 = (v: number) => (Math.abs(v) < 0.0005 ? 0 : v).toFixed(3);
const line = (label: string, value: string) => `${label.padEnd(10)} ${value}`;

export function riskTable(v: RiskView): string {
  const r = v.report;
  const out = [
    line('source', `${v.file}  ${v.source.width} x ${v.source.height}`),
    line('target', `${v.target.width} x ${v.target.height}  (scale ${pair(r.scale.x, r.scale.y, 3)})`),
    line('level', `${r.level}  (strongest false pattern ${r.margin.toFixed(2)}x its visibility threshold; 1 = just visible)`),
    line('viewing', `density ${r.viewing.density}, ${r.viewing.degreesPerPixel.toFixed(4)} degrees per pixel`),
    line('cutoff', `${pair(r.cutoff.x, r.cutoff.y, 2)} of the kernel's own`),
  ];
  const shown = r.patterns.filter((p) => p.kind !== 'clean' || p.margin > 0);
  if (shown.length > 0) {
    out.push('patterns', `  ${'kind'.padEnd(6)} ${'at (cycles/px)'.padEnd(16)} ${'seen at (/out px)'.padEnd(18)} ${'contrast'.padEnd(9)} ${'margin'.padEnd(7)} what it does`);
    for (const p of shown) {
      const at = `${f3(p.frequency.fx)}, ${f3(p.frequency.fy)}`;
      const seen = `${f3(p.apparent.fx)}, ${f3(p.apparent.fy)}`;
      out.push(`  ${p.kind.padEnd(6)} ${at.padEnd(16)} ${seen.padEnd(18)} ${pct(p.contrast).padEnd(9)} ${p.margin.toFixed(2).padEnd(7)} ${p.description}`);
    }
  }
  for (const a of r.advice) out.push(line('advice', `${a.change ? `${a.change} ` : ''}${a.effect}; ${a.cost}`));
  out.push(
    line('folded', `${pct(r.folded.unfiltered)} of the detail energy with no prefilter, ${pct(r.folded.planned)} with the planned filter`),
    line('nyquist', `${pair(r.nyquist.x, r.nyquist.y, 3)} cycles per source pixel`),
    line('sigma', `${pair(r.recommendedSigma.x, r.recommendedSigma.y, 2)} px (a Gaussian that would bring the folded energy under -40 dB)`),
    line('plan', v.plan),
  );
  if (r.peaks.length > 0) {
    out.push('peaks', `  ${'kind'.padEnd(10)} ${'at (cycles/px)'.padEnd(16)} ${'share'.padEnd(8)} ${'passed'.padEnd(8)} folds to (cycles/output px)`);
    for (const p of r.peaks) {
      const at = `${f3(p.fx)}, ${f3(p.fy)}`;
      const to = `${f3(p.aliasTo.fx)}, ${f3(p.aliasTo.fy)}`;
      out.push(`  ${p.kind.padEnd(10)} ${at.padEnd(16)} ${pct(p.power).padEnd(8)} ${pct(p.passed).padEnd(8)} ${to}`);
    }
  }
  out.push(`regions    visibility per region in threshold units, 0 (under 1: nothing to see) to 9 (9 or more), top row first`);
  const { columns, rows, margins } = r.grid;
  for (let y = 0; y < rows; y++) {
    const row = margins.slice(y * columns, (y + 1) * columns).map((m) => String(Math.min(9, Math.max(0, Math.floor(m)))));
    out.push(`  ${row.join(' ')}`);
  }
  out.push(line('reason', r.reason));
  for (const w of v.warnings) out.push(line('warning', w));
  return `${out.join('\n')}\n`;
}
