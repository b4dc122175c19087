/**
 * Memory under costly legal requests, against the service in its own process on 127.0.0.1,
 * with the default memory budget. Three scenarios, each bounded (a fixed number of requests):
 *   one     one 8192x8192 16-bit RGBA PNG (all zero, ~0.5 MB) at width=320&format=png
 *   ingest  four different such PNGs posted to /v1/ingest?widths=320 at once
 *   avif    twelve ?width=8100&height=4880&format=avif&enlarge=allowed of a 2400x1600 picture at once
 * For each it prints the status counts, peak RSS plus spool bytes (/dev/shm), the RSS 10 s after
 * the end against the idle RSS, and the seconds until /readyz is 200 again.
 * Targets (issue 18): peak RSS + spool <= 1.5 GiB, recovery <= 10 s.
 *   npx tsx load/memory-admission.ts [--budget-mib N]   (default: the service's own default)
 */
import { mkdtempSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setTimeout as delay } from 'node:timers/promises';
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import { startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { mib, printTable } from './lib/table.js';

const { values } = parseArgs({ options: { 'budget-mib': { type: 'string' } } });
const pool = values['budget-mib'] ? { pool: { memoryBudgetBytes: Number(values['budget-mib']) * 2 ** 20 } } : {};
const SIDE = 8192;
const dir = mkdtempSync(join(tmpdir(), 'foldwise-mem-'));
console.log('making four 8192x8192 16-bit RGBA PNGs (all zero but one marker) and a 2400x1600 picture...');
const bombs: Buffer[] = [];
for (let i = 0; i < 4; i++) {
  const marker = await sharp({ create: { width: 8, height: 8, channels: 4, background: { r: 255, g: 0, b: 0, alpha: 1 } } }).png().toBuffer();
  const png = await sharp({ create: { width: SIDE, height: SIDE, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
    .composite([{ input: marker, left: 8 * i, top: 0 }])
    .toColourspace('rgb16')
    .png({ compressionLevel: 9 })
    .toBuffer();
  bombs.push(png);
}
writeFileSync(join(dir, 'zeros16.png'), bombs[0]);
const ramp = Buffer.alloc(2400 * 1600 * 3);
for (let i = 0; i < ramp.length; i++) ramp[i] = (i * 7 + (i >> 12)) & 255;
await sharp(ramp, { raw: { width: 2400, height: 1600, channels: 3 } }).jpeg().toFile(join(dir, 'ramp.jpg'));
console.log(`bomb PNG: ${bombs[0].length} bytes; depth ${(await sharp(bombs[0]).metadata()).depth}`);

const server = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir, pool) });
const spoolBytes = () => {
  let sum = 0;
  for (const name of readdirSync('/dev/shm').filter((n) => n.startsWith(`foldwise-spool-${server.pid}-`))) {
    for (const f of readdirSync(join('/dev/shm', name))) sum += statSync(join('/dev/shm', name, f), { throwIfNoEntry: false })?.size ?? 0;
  }
  return sum;
};
const sample = () => {
  let peak = 0;
  const timer = setInterval(() => (peak = Math.max(peak, server.rss() + spoolBytes())), 50);
  return () => (clearInterval(timer), Math.max(peak, server.rss() + spoolBytes()));
};
const ready = async () => (await fetch(`${server.url}/readyz`)).status === 200;

const rows: Array<Array<string | number>> = [];
async function scenario(name: string, requests: Array<() => Promise<Response>>) {
  await fetch(`${server.url}/v1/renditions/ramp.jpg?width=64`); // warm threads
  await delay(2000);
  const idle = server.rss();
  const stop = sample();
  const statuses = await Promise.all(requests.map((r) => r().then(async (res) => (await res.arrayBuffer(), res.status), () => 0)));
  const peak = stop();
  const ended = performance.now();
  let readyAfter = NaN;
  for (let i = 0; i < 200; i++) {
    if (await ready()) {
      readyAfter = (performance.now() - ended) / 1000;
      break;
    }
    await delay(50);
  }
  await delay(Math.max(0, 10_000 - (performance.now() - ended)));
  const after = server.rss();
  const counts = Object.entries(statuses.reduce<Record<number, number>>((c, s) => ((c[s] = (c[s] ?? 0) + 1), c), {}))
    .map(([s, n]) => `${n}x${s}`)
    .join(' ');
  const metrics = await (await fetch(`${server.url}/metrics`)).text();
  const admitted = /foldwise_memory_admitted_bytes (\d+)/.exec(metrics)?.[1];
  rows.push([name, counts, mib(idle), mib(peak), mib(after), (after / idle).toFixed(2), readyAfter, Number(admitted)]);
}

try {
  await scenario('one', [() => fetch(`${server.url}/v1/renditions/zeros16.png?width=320&format=png`)]);
  await scenario(
    'ingest',
    bombs.map((body) => () => fetch(`${server.url}/v1/ingest?widths=320`, { method: 'POST', body, headers: { 'content-type': 'image/png' } })),
  );
  await scenario(
    'avif',
    Array.from({ length: 12 }, () => () => fetch(`${server.url}/v1/renditions/ramp.jpg?width=8100&height=4880&format=avif&enlarge=allowed`)),
  );
  const budget = /foldwise_memory_budget_bytes (\d+)/.exec(await (await fetch(`${server.url}/metrics`)).text())?.[1];
  printTable(`memory admission (budget ${mib(Number(budget)).toFixed(0)} MiB, target peak <= 1536 MiB, recovery <= 10 s)`, [
    'scenario', 'statuses', 'idle MiB', 'peak RSS+spool MiB', 'RSS +10 s MiB', 'ratio to idle', '/readyz 200 after s', 'admitted after',
  ], rows);
} finally {
  await server.stop();
}

