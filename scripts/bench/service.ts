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
import { startServer, startService, timedGet, warmClient } from './serve.js';

// [name, width, height, seed]: two new 4 MP pictures, 6.4 MP, 14.7 MP (deterministic textures).
export const pictures: Array<[string, number, number, number]> = [
  ['first-4mp.jpg', 2304, 1728, 11], ['new-4mp.jpg', 2304, 1728, 12],
  ['new-6mp.jpg', 3200, 2000, 13], ['new-15mp.jpg', 4432, 3324, 14],
];
// A load of new pictures, for the event-loop lag: six more 4 MP textures.
const flood: Array<[string, number, number, number]> = Array.from({ length: 6 }, (_, i) => [`flood-${i}.jpg`, 2304, 1728, 40 + i]);

export const rendition = (name: string, width: number) => `/v1/renditions/${name}?width=${width}&format=jpeg`;

/** The event-loop lag p99 and max (ms) prom-client reports since its previous scrape. */
async function eventLoopLag(url: string): Promise<{ p99: number; max: number }> {
  const text = await (await fetch(url + '/metrics')).text();
  const ms = (name: string) => Number(new RegExp(`^foldwise_nodejs_eventloop_lag_${name}_seconds (\\S+)`, 'm').exec(text)?.[1] ?? NaN) * 1000;
  return { p99: ms('p99'), max: ms('max') };
}

/** The lag while `names` (new pictures) are each rendered once, 3 at a time. */
async function lagUnderNewPictures(url: string, names: string[]): Promise<{ p99: number; max: number }> {
  await eventLoopLag(url); // the scrape starts a new window
  let next = 0;
  await Promise.all(Array.from({ length: 3 }, async () => {
    while (next < names.length) await timedGet(url + rendition(names[next++], 800));
  }));
  return eventLoopLag(url);
}

/** Runs the through-HTTP measurements `runs` times and returns their tables as text. */
export async function serviceBenchTable(runs: number, seconds: number): Promise<string> {
  const sourceDir = mkdtempSync(join(tmpdir(), 'foldwise-bench-sources-'));
  for (const [name, w, h, seed] of [...pictures, ...flood]) writeFileSync(join(sourceDir, name), await benchJpeg(w, h, seed));
  const lags: Array<{ p99: number; max: number }> = [];
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
    const service = await startService(sourceDir);
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
      lags.push(await lagUnderNewPictures(service.url, flood.map(([name]) => name)));
    } finally {
      await service.stop();
    }
  }
  const lines = [
    `through HTTP (npm start's server, fresh cache each run): median of ${runs} runs; ratio to sharp's decode-only time of the same bytes`,
    '| request | ratio (median) | ratios per run | ms (median) |',
    '|---|---|---|---|',
    ...[...rows].map(([label, r]) => `| ${label} | ${quantile(r.ratios, 0.5).toFixed(2)}x | ${r.ratios.map((x) => x.toFixed(2)).join(' ')} | ${quantile(r.ms, 0.5).toFixed(0)} |`),
  ];
  const p99s = lags.map((l) => l.p99);
  lines.push('', `event-loop lag while ${flood.length} new 4 MP pictures render, 3 at a time (/metrics): p99 median ${quantile(p99s, 0.5).toFixed(1)} ms (per run: ${p99s.map((x) => x.toFixed(1)).join(' ')}), max per run: ${lags.map((l) => l.max.toFixed(1)).join(' ')} ms (target: p99 < 20 ms)`);
  lines.push('', await throughput(sourceDir, seconds));
  rmSync(sourceDir, { recursive: true, force: true });
  return lines.join('\n');
}

/** Renders per second, every request a new width of the 4 and 6.4 MP pictures, ours against sharp's. */
async function throughput(sourceDir: string, seconds: number): Promise<string> {
  const names = ['new-4mp.jpg', 'new-6mp.jpg', 'first-4mp.jpg'];
  const service = await startService(sourceDir);
  const bare = await startServer(['--import', 'tsx', 'scripts/bench/sharp-route.ts', sourceDir], {}, /listening (\d+)/);
  const sharpUrl = `http://127.0.0.1:${bare.match[1]}`;
  const lines = [`renders per second, ${seconds} s per run, every request a new width (600-1199 px) of the ${names.length} 4-6.4 MP pictures, JPEG`,
    '| connections | foldwise renders/s | sharp linear-light renders/s | ratio | foldwise non-2xx |', '|---|---|---|---|---|'];
  try {
    for (const name of names) await timedGet(service.url + rendition(name, 800)); // analysed once, as a site's pictures are
    let n = 0;
    const next = (prefix: (name: string, w: number) => string) => () => prefix(names[n % names.length], 600 + (Math.floor(n++ / names.length) % 600));
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
