/**
 * A miss-heavy mix: 64 connections, every request a distinct rendition (source x width) of
 * one of 12 twelve-megapixel sources, against the service in its own process on 127.0.0.1.
 * Prints status counts, p50/p99 latency of the renders, the peak RSS of the server, and the
 * median render against sharp's decode of the same source measured in this run.
 * Targets (DESIGN.md): RSS < 1.5 GiB; no 5xx except deliberate 503 (shedding).
 *   npx tsx load/miss-mix.ts [--seconds 30] [--connections 64] [--max-queue N] [--threads N] [--thread-nice N]
 * (--max-queue / --threads / --thread-nice override the pool settings, to compare admission
 * bounds and the worker threads' priority.)
 */
import { parseArgs } from 'node:util';
import { join } from 'node:path';
import sharp from 'sharp';
import { cannon } from './lib/cannon.js';
import { sampleRss, startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { makeSources } from './lib/sources.js';
import { quantile } from './lib/stats.js';
import { mib, printTable } from './lib/table.js';

const { values } = parseArgs({
  options: {
    seconds: { type: 'string', default: '30' },
    connections: { type: 'string', default: '64' },
    'max-queue': { type: 'string' },
    threads: { type: 'string' },
    'thread-nice': { type: 'string' },
  },
});
const pool: Record<string, number> = {};
if (values['max-queue'] !== undefined) pool.maxQueue = Number(values['max-queue']);
if (values.threads !== undefined) pool.threads = Number(values.threads);
if (values['thread-nice'] !== undefined) pool.threadNice = Number(values['thread-nice']);
const seconds = Math.min(120, Number(values.seconds));
const connections = Math.min(256, Number(values.connections));
const RSS_TARGET = 1.5 * 2 ** 30;

console.log('making 12 sources of 12 MP (cached in the temp folder after the first run)...');
const { dir, names } = await makeSources(12);

// Reference, same run: sharp alone decoding one source to raw pixels (median of 5).
const decodeMs: number[] = [];
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  await sharp(join(dir, names[i % names.length])).raw().toBuffer();
  decodeMs.push(performance.now() - t0);
}
const decodeMedian = quantile(decodeMs, 0.5);

const server = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir, { pool }) });
try {
  let n = 0;
  // Source n % 12 at width 320 + floor(n / 12): no two requests ask for the same rendition.
  const nextPath = () => {
    const i = n++;
    return `/v1/renditions/${names[i % names.length]}?width=${320 + Math.floor(i / names.length)}&format=jpeg`;
  };
  const ok: number[] = [];
  const shed: number[] = [];
  const rss = sampleRss(server);
  const run = await cannon({
    url: server.url, connections, duration: seconds, nextPath, timeoutSeconds: 60,
    onResponse: (status, ms) => (status === 200 ? ok : status === 503 ? shed : []).push(ms),
  });
  const peak = rss.stop();
  const p50 = quantile(ok, 0.5);
  printTable(
    `miss mix: ${connections} connections for ${seconds} s over ${names.length} sources of 12 MP, every request a distinct rendition` +
      ` (pool overrides: ${JSON.stringify(pool)}; server log: ${server.logFile})`,
    ['figure', 'value', 'ratio', 'target'],
    [
      ['2xx (rendered)', run.ok2xx, '', ''],
      ['503 (deliberate: queue bound or pressure)', run.s503, '', ''],
      ['other 5xx', run.s5xxOther, '', '0'],
      ['4xx', run.s4xx, '', '0'],
      ['socket errors + timeouts', run.errors, '', '0'],
      ['sharp decode only, median ms (reference)', decodeMedian, 1, ''],
      ['render p50 ms (2xx, under load)', p50, p50 / decodeMedian, ''],
      ['render p99 ms (2xx, under load)', quantile(ok, 0.99), quantile(ok, 0.99) / decodeMedian, ''],
      ['503 p50 ms', quantile(shed, 0.5), quantile(shed, 0.5) / decodeMedian, ''],
      ['peak RSS MiB', mib(peak), peak / RSS_TARGET, '< 1536 MiB'],
    ],
  );
  const fine = run.s5xxOther === 0 && peak < RSS_TARGET && run.ok2xx > 0;
  console.log(`\nRSS ${mib(peak).toFixed(0)} MiB of 1536; other 5xx ${run.s5xxOther}: ${fine ? 'targets met' : 'targets NOT met'}`);
} finally {
  await server.stop();
}
