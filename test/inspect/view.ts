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
  legacy: ImageView;
  planned: ImageView;
  points: ImageView & { hidden: boolean };
  map: ImageView;
  spectrum: ImageView;
  /** The figures of the numbers list, by their data-key. */
  numbers: Record<string, string>;
  /** The level badges of the copies. */
  levels: { legacy: string; planned: string; points: string };
  /** The Kernel menu's option values. */
  kernels: string[];
  /** The pattern table's first column ("folds into coarse bands ..."). */
  patternNames: string[];
  /** The page's explanation of the lighter tone. */
  lighter: string;
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
  const zoom = document.getElementById('legacy-zoom');
  return {
    search: location.search,
    legacy: image('legacy-img'),
    planned: image('planned-img'),
    points: { ...image('points-img'), hidden: document.getElementById('points-panel').hidden },
    map: image('map-img'),
    spectrum: image('spectrum-img'),
    numbers,
    levels: {
      legacy: document.getElementById('legacy-level').textContent,
      planned: document.getElementById('planned-level').textContent,
      points: document.getElementById('points-level').textContent,
    },
    kernels: [...document.querySelectorAll('#kernel option')].map((o) => o.value),
    patternNames: [...document.querySelectorAll('#peaks tbody tr')].map((tr) => tr.cells[0].textContent),
    lighter: document.getElementById('lighter').textContent,
    verdict: document.getElementById('verdict-text').textContent,
    plan: document.getElementById('plan-header').textContent,
    peakRows: document.querySelectorAll('#peaks tbody tr').length,
    zoom: { width: zoom.width, height: zoom.height },
    alts: [...document.querySelectorAll('img')].filter((e) => !e.closest('[hidden]')).map((e) => e.alt)
      .concat([...document.querySelectorAll('canvas')].filter((e) => !e.closest('[hidden]')).map((e) => e.getAttribute('aria-label'))),
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
export function cropSpread(page: Page): Promise<{ legacy: number; planned: number }> {
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
    return { legacy: spread('legacy-zoom'), planned: spread('planned-zoom') };
  })()`);
}

/**
 * Dark pixels (grey level under 80) of a shown picture inside rows y0..y1 and columns x0..x1:
 * the labels and lines drawn into the map and spectrum PNGs.
 */
export function inkIn(page: Page, id: string, box: { x0: number; y0: number; x1: number; y1: number }): Promise<number> {
  return page.evaluate(`(() => {
    const img = document.getElementById(${JSON.stringify(id)});
    const canvas = document.createElement('canvas');
    canvas.width = img.naturalWidth;
    canvas.height = img.naturalHeight;
    const context = canvas.getContext('2d');
    context.drawImage(img, 0, 0);
    const b = ${JSON.stringify(box)};
    const { data } = context.getImageData(b.x0, b.y0, b.x1 - b.x0, b.y1 - b.y0);
    let dark = 0;
    for (let i = 0; i < data.length; i += 4) if (0.2126 * data[i] + 0.7152 * data[i + 1] + 0.0722 * data[i + 2] < 80) dark++;
    return dark;
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
