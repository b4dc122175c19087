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
  /** The level badges of the two copies. */
  levels: { naive: string; planned: string };
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
    levels: {
      naive: document.getElementById('naive-level').textContent,
      planned: document.getElementById('planned-level').textContent,
    },
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

/**
 * Standard deviation of the grey level (Rec. 709 luma weights on the 8-bit codes) of each
 * enlarged crop: how much false contrast each copy holds in the riskiest region.
 */
export function cropSpread(page: Page): Promise<{ naive: number; planned: number }> {
  return page.evaluate(`(() => {
    const spread = (id) => {
      const canvas = document.getElementById(id);
      const { data } = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height);
      let sum = 0, sum2 = 0, n = 0;
      for (let i = 0; i < data.length; i += 4) {
        const y = 0.2126 * data[i] + 0.7152 * data[i + 1] + 0.0722 * data[i + 2];
        sum += y; sum2 += y * y; n++;
      }
      return Math.sqrt(Math.max(0, sum2 / n - (sum / n) ** 2));
    };
    return { naive: spread('naive-zoom'), planned: spread('planned-zoom') };
  })()`);
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
