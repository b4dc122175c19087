/**
 * The inspector page's script (compiled for the browser by the /inspect route with esbuild).
 * One run: read the form, put it in the page URL, fetch the report and the four pictures in
 * parallel, show them, then draw the enlarged crops and the numbers. A newer run aborts an
 * older one, so quick changes never show a mix of two requests.
 */
import { getImage, getJson, showImage, ServiceProblem, type FetchedImage } from './api.js';
import { geometryOf, renderNumbers, renderPlan, type Report } from './report-view.js';
import { apiUrls, fromParams, pageSearch, readForm, startWidth, writeForm, type InspectState } from './state.js';
import { drawZoom, placeMark, riskiestWindow, zoomFactor } from './zoom.js';

const byId = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

const form = byId<HTMLFormElement>('controls');
const status = byId<HTMLParagraphElement>('status');
const results = byId<HTMLDivElement>('results');
let runs = 0;
let inFlight: AbortController | undefined;

function say(text: string, isError = false): void {
  status.textContent = text;
  status.classList.toggle('error', isError);
}

async function listSources(): Promise<string[]> {
  const body = await getJson<unknown>('v1/sources', 'The picture list', new AbortController().signal);
  const items = Array.isArray(body) ? body : ((body as { sources?: unknown[] }).sources ?? []);
  const paths = items.map((item) => (typeof item === 'string' ? item : (item as { path?: string }).path));
  return paths.filter((p): p is string => typeof p === 'string');
}

function fillSourceList(paths: string[]): void {
  const list = byId<HTMLDataListElement>('source-list');
  list.replaceChildren(...paths.map((path) => Object.assign(document.createElement('option'), { value: path })));
}

function drawCrops(report: Report, state: InspectState): void {
  const naiveImg = byId<HTMLImageElement>('naive-img');
  const plannedImg = byId<HTMLImageElement>('planned-img');
  const win = riskiestWindow(report.grid, geometryOf(report, naiveImg));
  placeMark(byId('naive-mark'), win);
  placeMark(byId('planned-mark'), win);
  const note = byId<HTMLParagraphElement>('zoom-note');
  if (!win) {
    note.textContent = 'The report names no region inside this copy.';
    return;
  }
  const zoom = zoomFactor(win);
  const where = `output pixels ${win.x}–${win.x + win.width} across, ${win.y}–${win.y + win.height} down`;
  note.textContent =
    `The outlined square on each copy (${where}; risk ${win.risk.toFixed(2)}), ` +
    `shown ${zoom} times larger so every pixel is a clear square.`;
  drawZoom(byId('naive-zoom'), naiveImg, win, zoom, `Careless copy of ${state.source}, ${where}, enlarged ${zoom} times`);
  drawZoom(byId('planned-zoom'), plannedImg, win, zoom, `foldwise copy of ${state.source}, ${where}, enlarged ${zoom} times`);
}

async function run(state: InspectState, history: 'push' | 'replace' | 'keep'): Promise<void> {
  const mine = ++runs;
  inFlight?.abort();
  const controller = new AbortController();
  inFlight = controller;
  if (history !== 'keep') window.history[`${history}State`](null, '', pageSearch(state));
  results.setAttribute('aria-busy', 'true');
  say(`Making both copies of ${state.source} at ${state.width} px wide…`);
  const fetched: FetchedImage[] = [];
  const keep = (image: FetchedImage) => {
    if (mine === runs) fetched.push(image);
    else URL.revokeObjectURL(image.objectUrl);
    return image;
  };
  try {
    const urls = apiUrls(state);
    const signal = controller.signal;
    const [report, naive, planned, map, spectrum] = await Promise.all([
      getJson<Report>(urls.report, 'The risk report', signal),
      getImage(urls.naive, 'The careless copy', signal).then(keep),
      getImage(urls.planned, 'The foldwise copy', signal).then(keep),
      getImage(urls.map, 'The risk map', signal).then(keep),
      getImage(urls.spectrum, 'The spectrum', signal).then(keep),
    ]);
    if (mine !== runs) throw new DOMException('superseded', 'AbortError');
    const size = `${report.target.width}×${report.target.height}`;
    await Promise.all([
      showImage(byId('naive-img'), naive.objectUrl, `Careless copy of ${state.source}, ${size} pixels`),
      showImage(byId('planned-img'), planned.objectUrl, `foldwise copy of ${state.source}, ${size} pixels`),
      showImage(byId('map-img'), map.objectUrl, `Risk map of ${state.source} for a ${size} copy`),
      showImage(byId('spectrum-img'), spectrum.objectUrl, `Spectrum of ${state.source} with the new pixel grid's limit`),
    ]);
    if (mine !== runs) return;
    byId<HTMLAnchorElement>('naive-link').href = urls.naive;
    byId<HTMLAnchorElement>('planned-link').href = urls.planned;
    renderNumbers(report);
    renderPlan(planned.plan);
    drawCrops(report, state);
    results.dataset.shown = pageSearch(state);
    say(`Showing ${state.source} at ${size} pixels.`);
  } catch (error) {
    for (const image of fetched) URL.revokeObjectURL(image.objectUrl);
    if (mine !== runs || (error instanceof DOMException && error.name === 'AbortError')) return;
    say(error instanceof ServiceProblem ? error.message : `Something went wrong: ${String(error)}`, true);
  } finally {
    if (mine === runs) results.setAttribute('aria-busy', 'false');
  }
}

form.addEventListener('submit', (event) => {
  event.preventDefault();
  const state = readForm(form);
  if (!state.source || !state.width) {
    say(!state.source ? 'Choose or type a picture first.' : 'Give a width in pixels.', true);
    byId<HTMLInputElement>(!state.source ? 'source' : 'width').focus();
    return;
  }
  void run(state, 'push');
});

window.addEventListener('popstate', () => {
  const state = fromParams(new URLSearchParams(window.location.search));
  writeForm(form, state);
  if (state.source && state.width) void run(state, 'keep');
});

async function start(): Promise<void> {
  const state = fromParams(new URLSearchParams(window.location.search));
  const sources = await listSources().catch(() => [] as string[]);
  fillSourceList(sources);
  if (!state.source && sources.length > 0) state.source = sources[0];
  if (!state.width) state.width = startWidth;
  writeForm(form, state);
  if (state.source) await run(state, 'replace');
  else say('Type the path of a picture to begin.');
}

void start();
