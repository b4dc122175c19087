/**
 * The readable form of one alias-risk report for `foldwise risk`: aligned label/value lines,
 * the peaks as a small table, and the region grid as digits 0..9 (a text heat map).
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
    line('level', `${r.level}  (score ${r.score.toFixed(2)})`),
    line('folded', `${pct(r.folded.unfiltered)} of the detail energy with no prefilter, ${pct(r.folded.planned)} with the planned filter`),
    line('nyquist', `${pair(r.nyquist.x, r.nyquist.y, 3)} cycles per source pixel`),
    line('sigma', `${pair(r.recommendedSigma.x, r.recommendedSigma.y, 2)} px recommended`),
    line('plan', v.plan),
  ];
  if (r.peaks.length > 0) {
    out.push('peaks', `  ${'kind'.padEnd(10)} ${'at (cycles/px)'.padEnd(16)} ${'share'.padEnd(8)} ${'passed'.padEnd(8)} folds to (cycles/output px)`);
    for (const p of r.peaks) {
      const at = `${f3(p.fx)}, ${f3(p.fy)}`;
      const to = `${f3(p.aliasTo.fx)}, ${f3(p.aliasTo.fy)}`;
      out.push(`  ${p.kind.padEnd(10)} ${at.padEnd(16)} ${pct(p.power).padEnd(8)} ${pct(p.passed).padEnd(8)} ${to}`);
    }
  }
  out.push(`regions    risk per region, 0 (none) to 9 (high), top row first`);
  const { columns, rows, cells } = r.grid;
  for (let y = 0; y < rows; y++) {
    const row = cells.slice(y * columns, (y + 1) * columns).map((c) => String(Math.min(9, Math.round(c * 9))));
    out.push(`  ${row.join(' ')}`);
  }
  out.push(line('reason', r.reason));
  for (const w of v.warnings) out.push(line('warning', w));
  return `${out.join('\n')}\n`;
}
