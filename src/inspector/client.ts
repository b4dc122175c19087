/**
 * The inspector page's script (compiled for the browser by the /inspect route with esbuild).
 * One run: read the form, put it in the page URL, fetch the reports and the pictures in
 * parallel, show them, then draw the enlarged crops and the numbers. A newer run aborts an
 * older one, so quick changes never show a mix of two requests.
 */
import { getImage, getJson, hideImage, showImage, ServiceProblem, type FetchedImage } from './api.js';
import { clearCrops, showCrops, type Copy } from './crops.js';
import { clearNumbers, renderNumbers, renderPlan, type Report } from './report-view.js';
import { apiUrls, fields, fromParams, pageSearch, readForm, startSource, startWidth, writeForm, type ApiUrls, type InspectState } from './state.js';

const byId = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

const form = byId<HTMLFormElement>('controls');
const status = byId<HTMLParagraphElement>('status');
const results = byId<HTMLDivElement>('results');
let runs = 0;
let inFlight: AbortController | undefined;

interface Picture {
  img: string;
  url: keyof ApiUrls;
  what: string;
  alt: (s: InspectState) => string;
}

/** The pictures of a run: where each is shown, where it comes from, how it is named. */
const copies: Record<Copy, Picture> = {
  legacy: { img: 'legacy-img', url: 'legacy', what: 'The legacy look', alt: (s) => `Legacy look of ${s.source}, ${s.width} pixels wide` },
  planned: { img: 'planned-img', url: 'planned', what: 'The foldwise copy', alt: (s) => `foldwise copy of ${s.source}, ${s.width} pixels wide` },
  points: { img: 'points-img', url: 'points', what: 'The point-sampled copy', alt: (s) => `Point-sampled copy of ${s.source}, ${s.width} pixels wide` },
};
const analyses: Picture[] = [
  { img: 'map-img', url: 'map', what: 'The risk map', alt: (s) => `Map of where false patterns would show over ${s.source} for a copy ${s.width} pixels wide, in threshold units` },
  { img: 'spectrum-img', url: 'spectrum', what: 'The spectrum', alt: (s) => `Spectrum of ${s.source} in cycles per source pixel, with the new Nyquist drawn on it` },
];

function say(text: string, isError = false): void {
  status.textContent = text;
  status.classList.toggle('error', isError);
}

/** One line for every failure; requests that failed for the same reason share it. */
function describeFailures(reasons: unknown[]): string {
  const byProblem = new Map<string, string[]>();
  for (const reason of reasons) {
    const [what, problem] = reason instanceof ServiceProblem ? [reason.what, reason.problem] : ['The page', String(reason)];
    byProblem.set(problem, [...(byProblem.get(problem) ?? []), what]);
  }
  const list = (whats: string[]) => whats.map((w, i) => (i === 0 ? w : w[0].toLowerCase() + w.slice(1))).join(', ');
  return [...byProblem].map(([problem, whats]) => `${list(whats)}: ${problem}.`).join(' ');
}

async function listSources(): Promise<string[]> {
  const body = await getJson<{ sources?: { path?: unknown }[] }>('v1/sources', 'The picture list');
  return (body.sources ?? []).map((item) => item.path).filter((p): p is string => typeof p === 'string');
}

function fillSourceList(paths: string[]): void {
  const list = byId<HTMLDataListElement>('source-list');
  list.replaceChildren(...paths.map((path) => Object.assign(document.createElement('option'), { value: path })));
}

async function run(state: InspectState, history: 'push' | 'replace' | 'keep'): Promise<void> {
  const mine = ++runs;
  inFlight?.abort();
  const controller = new AbortController();
  inFlight = controller;
  if (history !== 'keep') window.history[`${history}State`](null, '', pageSearch(state));
  results.setAttribute('aria-busy', 'true');
  say(`Making the copies of ${state.source} at ${state.width} px wide…`);
  const shownCopies: Copy[] = state.points === 'shown' ? ['legacy', 'planned', 'points'] : ['legacy', 'planned'];
  for (const id of ['points-panel', 'points-zoom-panel']) byId(id).hidden = state.points !== 'shown';
  if (state.points !== 'shown') hideImage(byId<HTMLImageElement>('points-img'));
  const pictures = [...shownCopies.map((c) => copies[c]), ...analyses];
  try {
    const urls = apiUrls(state);
    const reportOf = (url: keyof ApiUrls, what: string) => getJson<Report>(urls[url], what, controller.signal);
    const [planned, legacy, points, ...images] = await Promise.allSettled([
      reportOf('report', 'The risk report'),
      reportOf('legacyReport', 'The report of the legacy look'),
      state.points === 'shown' ? reportOf('pointsReport', 'The report of point sampling') : Promise.resolve(undefined),
      ...pictures.map((p) => getImage(urls[p.url], p.what, controller.signal)),
    ]);
    const fetched = images.flatMap((r) => (r.status === 'fulfilled' ? [r.value] : []));
    if (mine !== runs) {
      for (const image of fetched) URL.revokeObjectURL(image.objectUrl);
      return;
    }
    const shown = await Promise.allSettled(
      images.map((r, i) => {
        const img = byId<HTMLImageElement>(pictures[i].img);
        if (r.status === 'fulfilled') return showImage(img, r.value.objectUrl, pictures[i].what, pictures[i].alt(state));
        hideImage(img);
        return Promise.resolve();
      }),
    );
    if (mine !== runs) return;
    for (const copy of shownCopies) byId<HTMLAnchorElement>(`${copy}-link`).href = urls[copies[copy].url];
    const plannedImage = images[1] as PromiseSettledResult<FetchedImage>;
    renderPlan(plannedImage.status === 'fulfilled' ? plannedImage.value.plan : null);
    const copiesShown = shownCopies.every((_, i) => images[i].status === 'fulfilled' && shown[i].status === 'fulfilled');
    const value = <T>(r: PromiseSettledResult<T>) => (r.status === 'fulfilled' ? r.value : undefined);
    const linkFor = (change: string) => {
      const params = new URLSearchParams(change);
      const names = [...params.keys()];
      if (names.length === 0 || !names.every((n) => fields.includes(n as (typeof fields)[number]))) return undefined;
      return pageSearch({ ...state, ...Object.fromEntries(params) });
    };
    if (planned.status === 'fulfilled') renderNumbers({ planned: planned.value, legacy: value(legacy), points: value(points) }, linkFor);
    else clearNumbers();
    if (copiesShown) showCrops(state.source, shownCopies);
    else clearCrops('The enlarged crops need the copies side by side.');
    const failures = [planned, legacy, points, ...images, ...shown].flatMap((r) => (r.status === 'rejected' ? [r.reason] : []));
    results.dataset.shown = pageSearch(state);
    if (failures.length > 0) say(describeFailures(failures), true);
    else say(`Showing ${state.source} at ${state.height ? `${state.width}×${state.height} px` : `${state.width} px wide`}.`);
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

/** Shows the state the page URL names (back and forward, or a page restored from cache). */
function followUrl(): void {
  const state = fromParams(new URLSearchParams(window.location.search));
  writeForm(form, state);
  if (state.source && state.width) void run(state, 'keep');
}

window.addEventListener('popstate', followUrl);
window.addEventListener('pageshow', (event) => {
  if (event.persisted && results.dataset.shown !== window.location.search) followUrl();
});

async function start(): Promise<void> {
  const state = fromParams(new URLSearchParams(window.location.search));
  const sources = await listSources().catch(() => [] as string[]);
  fillSourceList(sources);
  if (!state.source && sources.length > 0) state.source = sources.includes(startSource) ? startSource : sources[0];
  if (!state.width) state.width = startWidth;
  writeForm(form, state);
  if (state.source) await run(state, 'replace');
  else say('Type the path of a picture to begin.');
}

void start();
