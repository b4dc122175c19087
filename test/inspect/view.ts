import type { Page } from 'playwright-core';

/** One picture as the page shows it: its current src and its decoded size. */
export interface ImageView {
  src: string;
  width: number;
  height: number;
}

/** What the inspector shows once a run has finished. */
export interface View {
  search: string;
  naive: ImageView;
  planned: ImageView;
  map: ImageView;
  spectrum: ImageView;
  /** The figures of the numbers list, by their data-key. */
  numbers: Record<string, string>;
  level: string;
  verdict: string;
  plan: string;
  peakRows: number;
  zoom: { width: number; height: number };
  alts: string[];
}

/** The little of the browser's globals the waits below touch (no DOM library in tests). */
interface PageGlobals {
  document: {
    getElementById(id: string): {
      dataset: Record<string, string | undefined>;
      classList: { contains(name: string): boolean };
      getAttribute(name: string): string | null;
    } | null;
  };
  location: { search: string };
}

/**
 * Waits run as functions: the page's Content-Security-Policy forbids eval, which is how
 * playwright would run a waited-for string. A function is sent as its source text alone, so
 * each one names the globals it needs itself. Reads are plain evaluations, which CSP allows.
 */
const finished = () => {
  const { document, location } = globalThis as unknown as PageGlobals;
  const results = document.getElementById('results');
  if (document.getElementById('status')?.classList.contains('error')) return 'error';
  const done = results !== null && results.dataset.shown === location.search && results.getAttribute('aria-busy') === 'false';
  return done ? 'done' : false;
};

/** Waits until the status line reports an error. */
export async function failed(page: Page): Promise<void> {
  await page.waitForFunction(() => {
    const { document } = globalThis as unknown as PageGlobals;
    return document.getElementById('status')?.classList.contains('error') === true;
  });
}

const collect = `(() => {
  const image = (id) => {
    const e = document.getElementById(id);
    return { src: e.src, width: e.naturalWidth, height: e.naturalHeight };
  };
  const numbers = {};
  for (const dd of document.querySelectorAll('#numbers dd')) numbers[dd.dataset.key] = dd.textContent;
  const zoom = document.getElementById('naive-zoom');
  return {
    search: location.search,
    naive: image('naive-img'),
    planned: image('planned-img'),
    map: image('map-img'),
    spectrum: image('spectrum-img'),
    numbers,
    level: document.getElementById('level-badge').textContent,
    verdict: document.getElementById('verdict-text').textContent,
    plan: document.getElementById('plan-header').textContent,
    peakRows: document.querySelectorAll('#peaks tbody tr').length,
    zoom: { width: zoom.width, height: zoom.height },
    alts: [...document.querySelectorAll('img')].map((e) => e.alt)
      .concat([...document.querySelectorAll('canvas')].map((e) => e.getAttribute('aria-label'))),
  };
})()`;

/**
 * Waits until the page has finished showing the state its URL names, then reads it; fails
 * at once, with the page's own words, when the page reports an error instead.
 */
export async function shown(page: Page): Promise<View> {
  const outcome = await (await page.waitForFunction(finished)).jsonValue();
  if (outcome === 'error') throw new Error(`the page reports: ${await page.textContent('#status')}`);
  return page.evaluate<View>(collect);
}

export function readView(page: Page): Promise<View> {
  return page.evaluate<View>(collect);
}

/** Counts load events per element id in window.loads, on every document the page opens. */
export async function startLoadCounter(page: Page): Promise<void> {
  await page.addInitScript(`
    window.loads = {};
    document.addEventListener('load', (event) => {
      const id = event.target && event.target.id;
      if (id) window.loads[id] = (window.loads[id] || 0) + 1;
    }, true);
  `);
}
