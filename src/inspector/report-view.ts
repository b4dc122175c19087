/**
 * The report's numbers in words: the one-sentence verdict, the advice, the list of figures,
 * the table of patterns and the Rendition-Plan header. Every figure keeps its unit; patterns
 * are also said in pixels ("repeats every 13.2 px") for readers who do not count cycles.
 */
import { patternName, type Pattern } from './patterns.js';

type Level = 'low' | 'moderate' | 'high';
type Pair = { x: number; y: number };

/** The fields of GET /v1/alias-risk/{source} that the page shows (see src/risk/report.ts). */
export interface Report {
  source: { width: number; height: number };
  target: { width: number; height: number };
  canvas: { width: number; height: number; left: number; top: number } | null;
  scale: Pair;
  nyquist: Pair;
  level: Level;
  /** Absent only from a service older than the visibility model; the page then shows none. */
  patterns?: Pattern[];
  viewing?: { degreesPerPixel: number; density: number };
  /** What a change of the query would remove, and what it costs the picture. */
  advice?: { change: string; effect: string; cost: string }[];
  reason: string;
  plan: { header: string };
}

/** The reports of the copies on the page; `points` only when point sampling is shown. */
export interface Reports {
  legacy?: Report;
  planned: Report;
  points?: Report;
}

const byId = (id: string): HTMLElement => document.getElementById(id) as HTMLElement;
const fixed = (v: number, d = 3) => v.toFixed(d);
const signed = (v: number, d = 3) => (v > 0 ? '+' : v < 0 ? '−' : '') + Math.abs(v).toFixed(d);
/** Source or output pixels per cycle; a dash where the pattern does not vary along that axis. */
const period = (f: number) => (Math.abs(f) >= 1e-3 ? fixed(1 / Math.abs(f), 1) : '—');
const both = (p: Pair, show: (v: number) => string) => (p.x === p.y ? show(p.x) : `${show(p.x)} / ${show(p.y)}`);

/** The levels in words, as the report defines them. */
export const levelWords: Record<Level, string> = {
  low: 'nothing a viewer will see',
  moderate: 'faint false patterns, visible on close inspection',
  high: 'plainly visible false patterns',
};

/** The most visible pattern that is not a clean pass, if any. */
const worst = (report: Report) =>
  (report.patterns ?? []).filter((p) => p.kind !== 'clean').reduce<Pattern | undefined>((a, p) => (!a || p.margin > a.margin ? p : a), undefined);

function sayCopy(name: string, report: Report): string {
  const top = worst(report);
  const what = `${name} shows ${levelWords[report.level]}`;
  if (!top || report.level === 'low') return `${what}.`;
  return `${what}: the strongest pattern ${patternName(top)}, at ${fixed(top.margin, 1)} times the threshold of visibility.`;
}

function verdict(r: Reports): string {
  const parts = [r.legacy ? sayCopy('The legacy look', r.legacy) : 'The legacy look has no report.', sayCopy('The foldwise copy', r.planned)];
  if (r.points) parts.push(sayCopy('Point sampling', r.points));
  return parts.join(' ');
}

function badge(id: string, level: Level | undefined): void {
  const element = byId(id);
  element.textContent = level ? `${level}: ${level === 'low' ? 'nothing to see' : level === 'moderate' ? 'faint' : 'plainly visible'}` : '';
  element.className = `badge ${level ?? ''}`;
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

function renderPatterns(patterns: Pattern[]): void {
  const body = byId('peaks').querySelector('tbody') as HTMLTableSectionElement;
  const rows = patterns.map((p) => {
    const row = cellsOf([
      patternName(p),
      `${signed(p.frequency.fx)} / ${signed(p.frequency.fy)}`,
      `${period(p.frequency.fx)} / ${period(p.frequency.fy)}`,
      `${signed(p.apparent.fx)} / ${signed(p.apparent.fy)}`,
      fixed(p.cyclesPerDegree, 1),
      p.contrast * 100 >= 0.005 ? `${fixed(p.contrast * 100, 2)} %` : '< 0.01 %',
      p.margin >= 0.005 ? fixed(p.margin, 2) : '< 0.01',
    ]);
    row.title = p.description;
    row.dataset.kind = p.kind;
    return row;
  });
  if (rows.length === 0) {
    const td = Object.assign(document.createElement('td'), { textContent: 'No strong pattern near or beyond the new pixel grid.', colSpan: 7 });
    rows.push(document.createElement('tr'));
    rows[0].append(td);
  }
  body.replaceChildren(...rows);
}

/** A page link that applies a query change (`prefilter=auto`), or undefined when it cannot. */
export type LinkFor = (change: string) => string | undefined;

function renderAdvice(report: Report, linkFor: LinkFor): void {
  const items = (report.advice ?? []).map((a) => {
    const li = document.createElement('li');
    if (a.change) {
      const code = Object.assign(document.createElement('code'), { textContent: a.change });
      const href = linkFor(a.change);
      const link = href ? Object.assign(document.createElement('a'), { href }) : undefined;
      link?.append(code);
      li.append(link ?? code, ': ');
    }
    li.append(`${a.effect}. Cost: ${a.cost}`.replace(/\.\./g, '.'));
    return li;
  });
  byId('advice').replaceChildren(...items);
}

/** Fills the verdict, the advice, the figures and the pattern table from the reports. */
export function renderNumbers(r: Reports, linkFor: LinkFor): void {
  const report = r.planned;
  badge('legacy-level', r.legacy?.level);
  badge('planned-level', report.level);
  badge('points-level', r.points?.level);
  byId('verdict-text').textContent = verdict(r);
  renderAdvice(report, linkFor);
  const list = byId('numbers');
  list.replaceChildren();
  term(list, 'Legacy look', r.legacy ? `${r.legacy.level}: ${levelWords[r.legacy.level]}` : 'no report', 'legacy-level');
  term(list, 'foldwise copy', `${report.level}: ${levelWords[report.level]}`, 'level');
  const bars = report.canvas ? ` on a ${report.canvas.width}×${report.canvas.height} canvas` : '';
  term(list, 'Size', `${report.source.width}×${report.source.height} → ${report.target.width}×${report.target.height} px${bars}`, 'size');
  term(list, 'Shrink factor', both(report.scale, (v) => `${fixed(v, 2)}×`), 'scale');
  term(list, 'Finest pattern the new grid holds (new Nyquist)',
    `${both(report.nyquist, (v) => fixed(v))} cycles per source px: one stripe pair every ${both(report.nyquist, period)} source px`, 'nyquist');
  if (report.viewing) {
    const { degreesPerPixel: dpp, density } = report.viewing;
    term(list, 'Seen from', `arm's length, one output px = ${fixed(dpp, 4)}° (CSS reference pixel${density !== 1 ? `, density ${density}` : ''})`, 'viewing');
  }
  term(list, 'In the analysis\'s words', report.reason, 'reason');
  renderPatterns(report.patterns ?? []);
}

/** Empties the verdict, figures and patterns, so nothing from an earlier request remains. */
export function clearNumbers(): void {
  for (const id of ['legacy-level', 'planned-level', 'points-level']) badge(id, undefined);
  byId('verdict-text').textContent = 'No report for this request.';
  byId('advice').replaceChildren();
  byId('numbers').replaceChildren();
  byId('peaks').querySelector('tbody')?.replaceChildren();
}

export function renderPlan(header: string | null): void {
  byId('plan-header').textContent = header ?? 'The service sent no Rendition-Plan header.';
}
