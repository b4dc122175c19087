/**
 * The scenarios of load/hostile.ts (issue 18, "what was seen"), each bounded in count and
 * time. A scenario sends its hostile traffic and returns what it saw; the caller measures
 * memory and recovery around it.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { HostileSources } from './hostile-sources.js';
import { flood, pause, send, Tally } from './probe.js';
import { startDripUpstream } from './drip-upstream.js';

export interface ScenarioContext {
  url: string;
  sourceDir: string;
  src: HostileSources;
  floodSeconds: number;
  clientTimeoutMs: number;
}

export interface ScenarioResult {
  tally: Tally;
  /** Share of cache hits answered 200 during a miss flood (scenario g only). */
  hitShare?: number;
  /** 200 answers to damaged sources (scenario d only). */
  corruptServed?: number;
  note?: string;
}

export interface Scenario {
  id: string;
  title: string;
  /** Extra configuration for this scenario's server (e.g. an allowlisted upstream). */
  config?: (ctx: { dripBase: string }) => Record<string, unknown>;
  run(ctx: ScenarioContext & { dripBase: string }): Promise<ScenarioResult>;
}

const png = (c: ScenarioContext) => ({ headers: { 'content-type': 'image/png' }, timeoutMs: c.clientTimeoutMs });

export const scenarios: Scenario[] = [
  {
    id: 'a',
    title: 'one 8192² 16-bit RGBA zero PNG, width=320 png',
    async run(c) {
      const tally = new Tally();
      tally.add(await send(c.url, `/v1/renditions/${c.src.bombs[0]}?width=320&format=png`, { timeoutMs: c.clientTimeoutMs }));
      return { tally };
    },
  },
  {
    id: 'b',
    title: 'four such PNGs (all different) posted at once to /v1/ingest?widths=320',
    async run(c) {
      const tally = new Tally();
      const bodies = c.src.bombs.slice(1, 5).map((name) => readFileSync(join(c.sourceDir, name)));
      await Promise.all(bodies.map(async (body) => tally.add(await send(c.url, '/v1/ingest?widths=320', { ...png(c), method: 'POST', body }))));
      return { tally };
    },
  },
  {
    id: 'c',
    title: 'twelve width=8100&height=4880 avif at once, then a flood at 64 connections',
    async run(c) {
      const tally = new Tally();
      const big = (k: number) => `/v1/renditions/${c.src.large[k % c.src.large.length]}?width=${8100 - Math.floor(k / 12)}&height=4880&format=avif&enlarge=allowed`;
      await Promise.all(Array.from({ length: 12 }, async (_, k) => tally.add(await send(c.url, big(k), { timeoutMs: c.clientTimeoutMs }))));
      const until = performance.now() + c.floodSeconds * 1000;
      await flood(64, until, async (n) => tally.add(await send(c.url, big(12 + n), { timeoutMs: c.clientTimeoutMs })));
      return { tally, note: `burst then ${c.floodSeconds} s flood` };
    },
  },
  {
    id: 'd',
    title: 'corrupt JPEG and WebP (flipped bytes, truncated, lying frame header), GET twice and upload',
    async run(c) {
      const tally = new Tally();
      let served = 0;
      for (const name of c.src.corrupt) {
        const type = name.endsWith('.webp') ? 'image/webp' : 'image/jpeg';
        const body = readFileSync(join(c.sourceDir, name));
        const tries = [
          () => send(c.url, `/v1/renditions/${name}?width=320&format=png`, { timeoutMs: c.clientTimeoutMs }),
          () => send(c.url, `/v1/renditions/${name}?width=320&format=png`, { timeoutMs: c.clientTimeoutMs }),
          () => send(c.url, '/v1/ingest?widths=320', { method: 'POST', headers: { 'content-type': type }, body, timeoutMs: c.clientTimeoutMs }),
        ];
        for (const attempt of tries) {
          const o = tally.add(await attempt());
          if (o.kind === 'status' && o.status === 200) served++;
        }
      }
      return { tally, corruptServed: served, note: `${c.src.corrupt.length} files x 3 requests` };
    },
  },
  {
    id: 'e',
    title: 'six clients give up after 1 s on big misses; then one small miss',
    async run(c) {
      const tally = new Tally();
      const gone = Array.from({ length: 6 }, (_, k) =>
        send(c.url, `/v1/renditions/${c.src.large[k]}?width=${3000 + k}&format=avif`, { abortAfterMs: 1000 }).then((o) => tally.add(o)),
      );
      await Promise.all(gone);
      const small = tally.add(await send(c.url, `/v1/renditions/${c.src.small}?width=300&format=jpeg`, { timeoutMs: c.clientTimeoutMs }));
      const status = small.kind === 'status' ? small.status : small.kind;
      return { tally, note: `small miss after the aborts: ${status} in ${(small.ms / 1000).toFixed(1)} s` };
    },
  },
  {
    id: 'f',
    title: 'six reads of a dripping upstream (127.0.0.1) while folder misses go on',
    config: ({ dripBase }) => ({
      origin: { upstream: { allowHosts: [`http://${dripBase}`], allowPrivate: true, allowAddresses: ['127.0.0.0/8'] } },
    }),
    async run(c) {
      const tally = new Tally();
      const folder = new Tally();
      let slowDone = false;
      const slow = Promise.all(
        Array.from({ length: 6 }, async (_, k) =>
          tally.add(await send(c.url, `/v1/renditions/~upstream/${c.dripBase}/drip-${k}.jpg?width=200&format=jpeg`, { timeoutMs: c.clientTimeoutMs })),
        ),
      ).then(() => (slowDone = true));
      let width = 200;
      const misses = async () => {
        while (!slowDone) {
          folder.add(await send(c.url, `/v1/renditions/${c.src.small}?width=${width++}&format=jpeg`, { timeoutMs: c.clientTimeoutMs }));
          await pause(200);
        }
      };
      await Promise.all([slow, misses(), misses()]);
      for (const [k, n] of folder.counts) tally.counts.set(`folder-${k}`, n);
      return { tally, note: `folder misses meanwhile: ${folder}` };
    },
  },
  {
    id: 'g',
    title: 'miss flood at 64 connections while 4 clients ask for cache hits',
    async run(c) {
      const tally = new Tally();
      const hits = new Tally();
      const ready = new Tally();
      const hitPaths = [0, 1, 2, 3].map((k) => `/v1/renditions/${c.src.small}?width=${400 + k}&format=jpeg`);
      for (const p of hitPaths) await send(c.url, p, { timeoutMs: c.clientTimeoutMs });
      const until = performance.now() + c.floodSeconds * 1000;
      const missPath = (n: number) => `/v1/renditions/${c.src.large[n % c.src.large.length]}?width=${320 + Math.floor(n / 12)}&format=jpeg`;
      const readyLoop = async () => {
        while (performance.now() < until) {
          ready.add(await send(c.url, '/readyz', { timeoutMs: 5000 }));
          await pause(500);
        }
      };
      await Promise.all([
        flood(64, until, async (n) => tally.add(await send(c.url, missPath(n), { timeoutMs: c.clientTimeoutMs }))),
        flood(4, until, async (n) => hits.add(await send(c.url, hitPaths[n % 4], { timeoutMs: c.clientTimeoutMs }))),
        readyLoop(),
      ]);
      for (const [k, n] of hits.counts) tally.counts.set(`hit-${k}`, n);
      const hitShare = hits.outcomes.length ? hits.count('200') / hits.outcomes.length : NaN;
      return { tally, hitShare, note: `${c.floodSeconds} s; /readyz 200 in ${ready.count('200')} of ${ready.outcomes.length}` };
    },
  },
];

export { startDripUpstream };
