/**
 * The inspector page's script (compiled for the browser by the /inspect route with esbuild).
 * One run: read the form, put it in the page URL, fetch the report and the four pictures in
 * parallel, show them, then draw the enlarged crops and the numbers. A newer run aborts an
 * older one, so quick changes never show a mix of two requests.
 */
import { getImage, getJson, hideImage, showImage, ServiceProblem, type FetchedImage } from './api.js';
import { clearCrops, showCrops } from './crops.js';
import { clearNumbers, recommendedPrefilter, renderNumbers, renderPlan, type Report } from './report-view.js';
import { apiUrls, fromParams, pageSearch, readForm, startWidth, writeForm, type ApiUrls, type InspectState } from './state.js';

const byId = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

const form = byId<HTMLFormElement>('controls');
const status = byId<HTMLParagraphElement>('status');
const results = byId<HTMLDivElement>('results');
let runs = 0;
let inFlight: AbortController | undefined;

/** The four pictures of a run: where each is shown, where it comes from, how it is named. */
const pictures: { img: string; url: keyof ApiUrls; what: string; alt: (s: InspectState) => string }[] = [
  { img: 'naive-img', url: 'naive', what: 'The careless copy', alt: (s) => `Careless copy of ${s.source}, ${s.width} pixels wide` },
  { img: 'planned-img', url: 'planned', what: 'The foldwise copy', alt: (s) => `foldwise copy of ${s.source}, ${s.width} pixels wide` },
  { img: 'map-img', url: 'map', what: 'The risk map', alt: (s) => `Risk map over ${s.source} for a copy ${s.width} pixels wide` },
  { img: 'spectrum-img', url: 'spectrum', what: 'The spectrum', alt: (s) => `Spectrum of ${s.source} with the limit of the new pixel grid drawn on it` },
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

/** A link to this view with the recommended prefilter, when the planned copy is not yet safe. */
function offerBlur(sigma: string | undefined, state: InspectState): void {
  byId('try').hidden = sigma === undefined || state.prefilter === sigma;
  if (sigma !== undefined) byId<HTMLAnchorElement>('try-link').href = pageSearch({ ...state, prefilter: sigma });
}

async function run(state: InspectState, history: 'push' | 'replace' | 'keep'): Promise<void> {
  const mine = ++runs;
  inFlight?.abort();
  const controller = new AbortController();
  inFlight = controller;
  if (history !== 'keep') window.history[`${history}State`](null, '', pageSearch(state));
  results.setAttribute('aria-busy', 'true');
  say(`Making both copies of ${state.source} at ${state.width} px wide…`);
  try {
    const urls = apiUrls(state);
    const [report, ...images] = await Promise.allSettled([
      getJson<Report>(urls.report, 'The risk report', controller.signal),
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
    byId<HTMLAnchorElement>('naive-link').href = urls.naive;
    byId<HTMLAnchorElement>('planned-link').href = urls.planned;
    const planned = images[1] as PromiseSettledResult<FetchedImage>;
    renderPlan(planned.status === 'fulfilled' ? planned.value.plan : null);
    const copiesShown = [0, 1].every((i) => images[i].status === 'fulfilled' && shown[i].status === 'fulfilled');
    if (report.status === 'fulfilled') renderNumbers(report.value);
    else clearNumbers();
    offerBlur(report.status === 'fulfilled' ? recommendedPrefilter(report.value) : undefined, state);
    if (report.status === 'fulfilled' && copiesShown) showCrops(report.value, state.source);
    else clearCrops('The enlarged crops need both copies and the report.');
    const failures = [report, ...images, ...shown].flatMap((r) => (r.status === 'rejected' ? [r.reason] : []));
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
  if (!state.source && sources.length > 0) state.source = sources[0];
  if (!state.width) state.width = startWidth;
  writeForm(form, state);
  if (state.source) await run(state, 'replace');
  else say('Type the path of a picture to begin.');
}

void start();
