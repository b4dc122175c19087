/**
 * The report's numbers in words: the one-sentence verdict, the list of figures, the table of
 * peaks and the Rendition-Plan header. Every figure keeps its unit; each is also said in
 * pixels ("repeats every 2.2 px") for readers who do not think in cycles per pixel.
 */
import { levelOf, scoreOf } from '../core/risk/score.js';
import { describeRegion } from '../ingest/regions.js';
import type { Geometry, Grid } from './zoom.js';

type Level = 'low' | 'moderate' | 'high';
type Pair = { x: number; y: number };

/** The fields of GET /v1/alias-risk/{source} that the page shows (see src/core/risk). */
export interface Report {
  source: { width: number; height: number };
  target: { width: number; height: number };
  /** The output image when `contain` puts the picture on bars; null otherwise. */
  canvas: { width: number; height: number; left: number; top: number } | null;
  scale: Pair;
  nyquist: Pair;
  folded: { unfiltered: number; planned: number };
  score: number;
  level: Level;
  peaks: { fx: number; fy: number; power: number; kind: string; aliasTo: { fx: number; fy: number }; passed: number }[];
  grid: Grid;
  recommendedSigma: Pair;
  reason: string;
  plan: { crop: Geometry['crop']; header: string };
}

const byId = (id: string): HTMLElement => document.getElementById(id) as HTMLElement;
/** A share of energy as a percentage and in decibels (10 log10), the unit the levels use. */
function share(f: number): string {
  if (!(f > 0)) return '0 %';
  // Below -60 dB (one part in a million) nothing of it can show in 8-bit output.
  if (f < 1e-6) return '< 0.0001 % (< -60 dB)';
  const percent = f * 100;
  const text = percent >= 10 ? percent.toFixed(0) : percent >= 1 ? percent.toFixed(1) : percent.toPrecision(2);
  const db = 10 * Math.log10(f);
  return `${text} % (${Math.abs(db) < 0.05 ? '0.0' : db.toFixed(1)} dB)`;
}
const fixed = (v: number, d = 3) => v.toFixed(d);
/** Source or output pixels per cycle; a dash where the pattern does not vary along that axis. */
const period = (f: number) => (f >= 1e-3 ? fixed(1 / f, 1) : '—');
const both = (p: Pair, show: (v: number) => string) => (p.x === p.y ? show(p.x) : `${show(p.x)} / ${show(p.y)}`);
const xy = (fx: number, fy: number, show: (v: number) => string) => `${show(Math.abs(fx))} / ${show(Math.abs(fy))}`;

/** Where the rendition's pixels come from in the source, for mapping grid cells onto it. */
export function geometryOf(report: Report): Geometry {
  return {
    sourceWidth: report.source.width,
    sourceHeight: report.source.height,
    crop: report.plan.crop,
    targetWidth: report.target.width,
    targetHeight: report.target.height,
    offset: report.canvas ? { x: report.canvas.left, y: report.canvas.top } : undefined,
  };
}

/** The careless copy's level: the same thresholds applied to the unfiltered folded fraction. */
const carelessLevel = (report: Report): Level => levelOf(report.folded.unfiltered);

const looks: Record<Level, string> = {
  high: 'will shimmer',
  moderate: 'may show faint false patterns',
  low: 'is safe',
};

function verdict(report: Report): string {
  const careless = carelessLevel(report);
  const folded = share(report.folded.unfiltered);
  const kept = share(report.folded.planned);
  // A sharp spectral line folds into one false frequency (moiré); broadband energy folds into
  // noise-like jaggies (the peak kinds of src/core/risk/peaks.ts).
  const into = report.peaks[0]?.kind === 'periodic' ? 'false coarse bands (moiré)' : 'jagged steps and sparkle';
  const first =
    careless === 'low'
      ? `Neither copy is at risk at this size: only ${folded} of the detail energy would fold back even in the careless copy.`
      : `The careless copy ${looks[careless]}: ${folded} of the picture's detail energy folds into ${into}.`;
  if (careless === 'low') return first;
  if (report.level === 'low') {
    return `${first} The foldwise copy is safe: it blurs that detail away first and leaves ${kept}.`;
  }
  const where = describeRegion(report.grid);
  const sigma = recommendedPrefilter(report);
  const place = !where ? '' : where.startsWith('the ') ? `, mostly in ${where}` : `, over ${where}`;
  return `${first} Even the foldwise copy ${looks[report.level]} (${kept} folds back${place}); a blur of sigma ${sigma} source px (prefilter=${sigma}) would make it safe.`;
}

/** The prefilter value that brings the planned copy to low, or undefined when it already is. */
export function recommendedPrefilter(report: Report): string | undefined {
  if (report.level === 'low') return undefined;
  return Math.max(report.recommendedSigma.x, report.recommendedSigma.y).toFixed(2);
}

function badge(id: string, level: Level): void {
  const element = byId(id);
  element.textContent = `${level} risk`;
  element.className = `badge ${level}`;
}

function term(list: HTMLElement, name: string, value: string, key: string): void {
  const dt = Object.assign(document.createElement('dt'), { textContent: name });
  const dd = Object.assign(document.createElement('dd'), { textContent: value });
  dd.dataset.key = key;
  list.append(dt, dd);
}

function cellsOf(texts: string[]): HTMLTableRowElement {
  const tr = document.createElement('tr');
  tr.append(...texts.map((text) => Object.assign(document.createElement('td'), { textContent: text })));
  return tr;
}

function renderPeaks(peaks: Report['peaks']): void {
  const body = byId('peaks').querySelector('tbody') as HTMLTableSectionElement;
  const rows = peaks.map((peak) =>
    cellsOf([
      xy(peak.fx, peak.fy, (v) => fixed(v)),
      xy(peak.fx, peak.fy, period),
      xy(peak.aliasTo.fx, peak.aliasTo.fy, (v) => fixed(v)),
      xy(peak.aliasTo.fx, peak.aliasTo.fy, period),
      peak.kind === 'periodic' ? 'stripes or weave: moiré' : 'fine grain: sparkle, jagged edges',
      share(peak.power),
      share(peak.passed),
    ]),
  );
  if (rows.length === 0) {
    const td = Object.assign(document.createElement('td'), { textContent: 'No strong fine pattern beyond the new grid.', colSpan: 7 });
    rows.push(document.createElement('tr'));
    rows[0].append(td);
  }
  body.replaceChildren(...rows);
}

/** Fills the verdict, the figures and the peak table from one report. */
export function renderNumbers(report: Report): void {
  const careless = carelessLevel(report);
  badge('naive-level', careless);
  badge('planned-level', report.level);
  byId('verdict-text').textContent = verdict(report);
  const list = byId('numbers');
  list.replaceChildren();
  term(list, 'Risk of the careless copy', `${careless} (score ${fixed(scoreOf(report.folded.unfiltered), 2)} of 1)`, 'careless-score');
  term(list, 'Risk of the foldwise copy', `${report.level} (score ${fixed(report.score, 2)} of 1)`, 'score');
  const bars = report.canvas ? ` on a ${report.canvas.width}×${report.canvas.height} canvas` : '';
  term(list, 'Size', `${report.source.width}×${report.source.height} → ${report.target.width}×${report.target.height} px${bars}`, 'size');
  term(list, 'Shrink factor', both(report.scale, (v) => `${fixed(v, 2)}×`), 'scale');
  term(list, 'Finest pattern the new grid holds (new Nyquist)',
    `${both(report.nyquist, (v) => fixed(v))} cycles per source pixel: one stripe pair every ${both(report.nyquist, period)} source px`, 'nyquist');
  term(list, 'Detail energy that folds back, careless copy', share(report.folded.unfiltered), 'folded-unfiltered');
  term(list, 'Detail energy that folds back, foldwise copy', share(report.folded.planned), 'folded-planned');
  term(list, 'Blur that brings the risk to low (recommended sigma)', `${both(report.recommendedSigma, (v) => fixed(v, 2))} source px`, 'sigma');
  term(list, 'In the analysis\'s words', report.reason, 'reason');
  renderPeaks(report.peaks);
}

/** Empties the verdict, figures and peaks, so nothing from an earlier request remains. */
export function clearNumbers(): void {
  for (const id of ['naive-level', 'planned-level']) byId(id).textContent = '';
  byId('verdict-text').textContent = 'No report for this request.';
  byId('numbers').replaceChildren();
  byId('peaks').querySelector('tbody')?.replaceChildren();
}

export function renderPlan(header: string | null): void {
  byId('plan-header').textContent = header ?? 'The service sent no Rendition-Plan header.';
}
