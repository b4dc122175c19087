/**
 * The report's numbers in words: the one-sentence verdict, the list of figures, the table of
 * peaks and the Rendition-Plan header. Every figure keeps its unit; each is also said in
 * pixels ("repeats every 2.2 px") for readers who do not think in cycles per pixel.
 */
import { describeRegion } from '../ingest/regions.js';
import type { Geometry, Grid } from './zoom.js';

type Level = 'low' | 'moderate' | 'high';
type Pair = { x: number; y: number };

/** The fields of GET /v1/alias-risk/{source} that the page shows (see src/core/risk). */
export interface Report {
  source: { width: number; height: number };
  target: { width: number; height: number };
  scale: Pair;
  nyquist: Pair;
  folded: { unfiltered: number; planned: number };
  score: number;
  level: Level;
  peaks: { fx: number; fy: number; power: number; kind: string; aliasTo: { fx: number; fy: number }; passed: number }[];
  grid: Grid;
  recommendedSigma: Pair;
  reason: string;
  plan: { crop?: Geometry['crop'] };
}

const byId = (id: string): HTMLElement => document.getElementById(id) as HTMLElement;
/** A share of energy as a percentage and in decibels (10 log10), the unit the levels use. */
const share = (f: number) => (f > 0 ? `${(f * 100).toPrecision(2)} % (${(10 * Math.log10(f)).toFixed(1)} dB)` : '0 %');
const fixed = (v: number, d = 3) => v.toFixed(d);
const period = (f: number) => (f > 0 ? fixed(1 / f, 1) : '—');
const both = (p: Pair, show: (v: number) => string) => (p.x === p.y ? show(p.x) : `${show(p.x)} / ${show(p.y)}`);
const xy = (fx: number, fy: number, show: (v: number) => string) => `${show(Math.abs(fx))} / ${show(Math.abs(fy))}`;

/** Where the rendition's pixels come from in the source, for mapping grid cells onto it. */
export function geometryOf(report: Report, img: HTMLImageElement): Geometry {
  const { width: sourceWidth, height: sourceHeight } = report.source;
  return {
    sourceWidth,
    sourceHeight,
    crop: report.plan.crop ?? { x: 0, y: 0, width: sourceWidth, height: sourceHeight },
    targetWidth: img.naturalWidth,
    targetHeight: img.naturalHeight,
  };
}

function verdict(report: Report): string {
  const where = describeRegion(report.grid) ?? 'the whole picture';
  const careless = share(report.folded.unfiltered);
  const planned = share(report.folded.planned);
  if (report.level === 'low') {
    return `Little risk at this size: only ${careless} of the fine detail would fold into false patterns in the careless copy; foldwise leaves ${planned}.`;
  }
  const verb = report.level === 'high' ? 'will shimmer' : 'may show faint false patterns';
  return `The careless copy ${verb}, mostly in ${where}: ${careless} of the fine detail folds into false coarse bands (moiré). The foldwise copy blurs it away first and leaves ${planned}.`;
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
  const badge = byId('level-badge');
  badge.textContent = report.level;
  badge.className = `badge ${report.level}`;
  byId('verdict-text').textContent = verdict(report);
  const list = byId('numbers');
  list.replaceChildren();
  term(list, 'Risk', `${report.level} (score ${fixed(report.score, 2)} of 1)`, 'score');
  term(list, 'Size', `${report.source.width}×${report.source.height} → ${report.target.width}×${report.target.height} px`, 'size');
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
  byId('level-badge').textContent = '';
  byId('verdict-text').textContent = 'No report for this request.';
  byId('numbers').replaceChildren();
  byId('peaks').querySelector('tbody')?.replaceChildren();
}

export function renderPlan(header: string | null): void {
  byId('plan-header').textContent = header ?? 'The service sent no Rendition-Plan header.';
}
