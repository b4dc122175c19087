/**
 * `npm run bench`, through HTTP: the service started as `npm start` starts it (a child process,
 * tsx src/server.ts, 127.0.0.1, a fresh temporary cache folder every run), timed as a user
 * meets it, each time as a ratio to sharp's decode-only time of the same bytes measured in the
 * same run; medians over runs. Then renders per second at 4 and 16 connections (every request
 * a new width, so a render, not a cache hit) against sharp's linear-light resize in a bare
 * Fastify route (scripts/bench/sharp-route.ts) on the same pictures, in the same run.
 * Loopback only, bounded in requests and seconds.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { cannon } from '../../load/lib/cannon.js';
import { quantile } from '../../load/lib/stats.js';
import { benchJpeg } from './texture.js';
import { decodeRaw } from './decode.js';
import { timeRuns } from './timing.js';
import { type ServiceSettings, startServer, startService, timedGet, warmClient } from './serve.js';
import { lagLines, type LagRun, probeHits } from './lag.js';
import { setTimeout as sleep } from 'node:timers/promises';

// [name, width, height, seed]: two new 4 MP pictures, 6.4 MP, 14.7 MP (deterministic textures).
export const pictures: Array<[string, number, number, number]> = [
  ['first-4mp.jpg', 2304, 1728, 11], ['new-4mp.jpg', 2304, 1728, 12],
  ['new-6mp.jpg', 3200, 2000, 13], ['new-15mp.jpg', 4432, 3324, 14],
];
// Loads of new pictures: six more 4 MP textures for the event-loop lag, six for the cache hits' probe.
const flood: Array<[string, number, number, number]> = Array.from({ length: 12 }, (_, i) => [`flood-${i}.jpg`, 2304, 1728, 40 + i]);
const LOAD = 6;

export const rendition = (name: string, width: number, quality?: number) => `/v1/renditions/${name}?width=${width}&format=jpeg${quality ? `&quality=${quality}` : ''}`;

/** Widths and JPEG qualities the throughput runs draw their requests from (qualities just below the default 82, so none is the key of a default-quality rendition made before; the encode costs about the same). */
const WIDTHS = { first: 600, count: 600 };
const QUALITIES = { first: 77, count: 5 };

/**
 * The n-th request of a throughput run (n from 0): the pictures in turn, each at a width and
 * quality no earlier request of that picture had, so every answer is a render, not a cache hit.
 * A refused request (503) uses up its key too, so the keys are many: pictures x 600 widths x 5
 * qualities. Throws past them, rather than let hits pass for renders.
 */
export function throughputRequest(names: readonly string[], n: number): { name: string; width: number; quality: number } {
  const round = Math.floor(n / names.length);
  if (round >= WIDTHS.count * QUALITIES.count) throw new Error(`request ${n} would repeat an earlier one's width and quality`);
  return { name: names[n % names.length], width: WIDTHS.first + (round % WIDTHS.count), quality: QUALITIES.first + Math.floor(round / WIDTHS.count) };
}

/** The event-loop lag p99 and max (ms) prom-client reports since its previous scrape. */
async function eventLoopLag(url: string): Promise<{ p99: number; max: number }> {
  const text = await (await fetch(url + '/metrics')).text();
  const ms = (name: string) => Number(new RegExp(`^foldwise_nodejs_eventloop_lag_${name}_seconds (\\S+)`, 'm').exec(text)?.[1] ?? NaN) * 1000;
  return { p99: ms('p99'), max: ms('max') };
}

/** Each of `names` (new pictures) rendered once at 800 px, 3 at a time. */
async function renderNew(url: string, names: string[]): Promise<void> {
  let next = 0;
  await Promise.all(Array.from({ length: 3 }, async () => {
    while (next < names.length) await timedGet(url + rendition(names[next++], 800));
  }));
}

/**
 * The lag while `lagged` (new pictures) render, as before; then a cached rendition (`hit`)
 * asked while nothing renders, and while `probed` (more new pictures) render (lag.ts). The
 * probe has a load of its own of them, so the lag is measured as it always was.
 */
async function lagUnderNewPictures(url: string, lagged: string[], probed: string[], hit: string): Promise<LagRun> {
  await eventLoopLag(url); // the scrape starts a new window
  await renderNew(url, lagged);
  const lag = await eventLoopLag(url);
  const idleHits = await probeHits(url + hit, sleep(1000));
  const rendering = renderNew(url, probed);
  const busyHits = await probeHits(url + hit, rendering);
  await rendering;
  return { ...lag, busyHits, idleHits };
}

/** Runs the through-HTTP measurements `runs` times and returns their tables as text. */
export async function serviceBenchTable(runs: number, seconds: number, settings: ServiceSettings = {}): Promise<string> {
  const sourceDir = mkdtempSync(join(tmpdir(), 'foldwise-bench-sources-'));
  for (const [name, w, h, seed] of [...pictures, ...flood]) writeFileSync(join(sourceDir, name), await benchJpeg(w, h, seed));
  const lags: LagRun[] = [];
  const bytes = Object.fromEntries(pictures.map(([name]) => [name, readFileSync(join(sourceDir, name))]));
  const mp = (name: string) => { const p = pictures.find((q) => q[0] === name)!; return `${((p[1] * p[2]) / 1e6).toFixed(1)} MP`; };
  const rows = new Map<string, { ratios: number[]; ms: number[] }>();
  // The first timed request measures the service's first request, not this client's fetch.
  await warmClient();
  const add = (label: string, ms: number, decodeMs: number) => {
    const row = rows.get(label) ?? { ratios: [], ms: [] };
    row.ratios.push(ms / decodeMs);
    row.ms.push(ms);
    rows.set(label, row);
  };
  for (let run = 0; run < runs; run++) {
    // sharp's decode-only time of each picture, in this run (median of 3 after a warm-up).
    const decode: Record<string, number> = {};
    for (const [name] of pictures) decode[name] = (await timeRuns(3, () => decodeRaw(bytes[name]))).wall;
    const service = await startService(sourceDir, [], settings);
    try {
      add(`first request after start (${mp('first-4mp.jpg')} -> 800 px)`, await timedGet(service.url + rendition('first-4mp.jpg', 800)), decode['first-4mp.jpg']);
      for (const name of ['new-4mp.jpg', 'new-6mp.jpg', 'new-15mp.jpg']) {
        add(`first rendition of a new ${mp(name)} picture -> 800 px`, await timedGet(service.url + rendition(name, 800)), decode[name]);
      }
      for (const name of ['new-6mp.jpg', 'new-15mp.jpg']) {
        for (const width of [640, 1024]) {
          add(`further width of the ${mp(name)} picture -> ${width} px`, await timedGet(service.url + rendition(name, width)), decode[name]);
        }
      }
      const names = flood.map(([name]) => name);
      lags.push(await lagUnderNewPictures(service.url, names.slice(0, LOAD), names.slice(LOAD), rendition('first-4mp.jpg', 800)));
    } finally {
      await service.stop();
    }
  }
  const lines = [
    `through HTTP (npm start's server${Object.keys(settings).length ? `, with ${JSON.stringify(settings)}` : ''}, fresh cache each run): median of ${runs} runs; ratio to sharp's decode-only time of the same bytes`,
    '| request | ratio (median) | ratios per run | ms (median) |',
    '|---|---|---|---|',
    ...[...rows].map(([label, r]) => `| ${label} | ${quantile(r.ratios, 0.5).toFixed(2)}x | ${r.ratios.map((x) => x.toFixed(2)).join(' ')} | ${quantile(r.ms, 0.5).toFixed(0)} |`),
  ];
  lines.push('', ...lagLines(lags, `${LOAD} new 4 MP pictures`));
  lines.push('', await throughput(sourceDir, seconds, settings));
  rmSync(sourceDir, { recursive: true, force: true });
  return lines.join('\n');
}

/** Renders per second, every request a new width of the 4 and 6.4 MP pictures, ours against sharp's. */
async function throughput(sourceDir: string, seconds: number, settings: ServiceSettings): Promise<string> {
  const names = ['new-4mp.jpg', 'new-6mp.jpg', 'first-4mp.jpg'];
  const service = await startService(sourceDir, [], settings);
  const bare = await startServer(['--import', 'tsx', 'scripts/bench/sharp-route.ts', sourceDir], {}, /listening (\d+)/);
  const sharpUrl = `http://127.0.0.1:${bare.match[1]}`;
  // The pictures' decodes are kept (cache.decodedBytes, unless 0), so every request after the first of a picture resamples its kept decode; sharp's route decodes every time.
  const kept = settings.cache?.decodedBytes !== 0 ? ' (after its first, the service resamples each picture\'s kept decode: cache.decodedBytes)' : ' (every request decodes: cache.decodedBytes 0)';
  const lines = [`renders per second, ${seconds} s per run, every request a new width (600-1199 px) and quality (77-81) of the ${names.length} 4-6.4 MP pictures, JPEG${kept}`,
    '| connections | foldwise renders/s | sharp linear-light renders/s | ratio | foldwise non-2xx |', '|---|---|---|---|---|'];
  try {
    for (const name of names) await timedGet(service.url + rendition(name, 800)); // analysed once, as a site's pictures are
    let n = 0;
    const next = (prefix: (name: string, w: number, q: number) => string) => () => {
      const r = throughputRequest(names, n++);
      return prefix(r.name, r.width, r.quality);
    };
    for (const connections of [4, 16]) {
      const ours = await cannon({ url: service.url, connections, duration: seconds, nextPath: next(rendition), timeoutSeconds: 60 });
      const ref = await cannon({ url: sharpUrl, connections, duration: seconds, nextPath: next((name, w) => `/sharp/${name}?width=${w}`), timeoutSeconds: 60 });
      const ok = (r: typeof ours) => r.ok2xx / seconds;
      lines.push(`| ${connections} | ${ok(ours).toFixed(2)} | ${ok(ref).toFixed(2)} | ${(ok(ours) / ok(ref)).toFixed(2)}x | ${ours.completed - ours.ok2xx} |`);
    }
  } finally {
    await Promise.all([service.stop(), bare.stop()]);
  }
  return lines.join('\n');
}
