/**
 * Cache-hit throughput of one rendition against a bare Fastify route that returns the same
 * bytes, both measured in this run, each server in its own process on 127.0.0.1.
 * Target (DESIGN.md): hits >= 0.8x the bare route's requests per second.
 * Rounds alternate the order (bare first, then hit first, ...); each round gives one ratio, and
 * the median ratio is the figure (a shared machine's noise moves single runs a lot).
 * Each server's CPU time per request (from /proc) is printed too: on a small shared machine the
 * load generator competes for the same cores, so req/s swings with the neighbours, while CPU
 * per request measures what a hit costs the server; its ratio (bare / hit) is the steadier one.
 *   npx tsx load/hit-vs-bare.ts [--seconds 3] [--rounds 5] [--connections 32]
 */
import { writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { cannon, type CannonRun } from './lib/cannon.js';
import { startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { makeSources } from './lib/sources.js';
import { quantile } from './lib/stats.js';
import { printTable } from './lib/table.js';

const { values } = parseArgs({
  options: {
    seconds: { type: 'string', default: '3' },
    rounds: { type: 'string', default: '5' },
    connections: { type: 'string', default: '32' },
  },
});
const seconds = Math.min(30, Number(values.seconds));
const rounds = Math.min(20, Math.max(1, Number(values.rounds)));
const connections = Math.min(256, Number(values.connections));

const { dir, names } = await makeSources(1);
const renditionPath = `/v1/renditions/${names[0]}?width=800&format=jpeg`;
const app = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir) });
let bare: Awaited<ReturnType<typeof startChild>> | undefined;
try {
  const first = await fetch(app.url + renditionPath);
  if (first.status !== 200) throw new Error(`rendition answered ${first.status}: ${await first.text()}`);
  const body = Buffer.from(await first.arrayBuffer());
  const bodyFile = join(tmpdir(), 'foldwise-load-bare-body');
  writeFileSync(bodyFile, body);
  bare = await startChild('bare', { LOAD_BODY_FILE: bodyFile, LOAD_BODY_TYPE: first.headers.get('content-type') ?? '' });
  const check = await fetch(app.url + renditionPath);
  console.log(`rendition: ${body.length} bytes, second request Server-Timing: ${check.headers.get('server-timing')}`);

  const targets = { bare: `${bare.url}/bare`, hit: app.url + renditionPath };
  // Warm both (JIT, connection pools), then alternate so drift hits both sides alike.
  for (const url of Object.values(targets)) await cannon({ url, connections, duration: 1 });
  const servers = { bare, hit: app };
  type Run = CannonRun & { cpuUs: number };
  const runs: Record<'bare' | 'hit', Run[]> = { bare: [], hit: [] };
  const ratios: number[] = [];
  const cpuRatios: number[] = [];
  for (let i = 0; i < rounds; i++) {
    for (const side of i % 2 ? (['hit', 'bare'] as const) : (['bare', 'hit'] as const)) {
      const cpu0 = servers[side].cpuSeconds();
      const run = await cannon({ url: targets[side], connections, duration: seconds });
      const cpuUs = ((servers[side].cpuSeconds() - cpu0) * 1e6) / Math.max(1, run.completed);
      runs[side].push({ ...run, cpuUs });
    }
    ratios.push(runs.hit[i].rps / runs.bare[i].rps);
    cpuRatios.push(runs.bare[i].cpuUs / runs.hit[i].cpuUs);
  }
  const med = (rs: Run[], f: (r: Run) => number) => quantile(rs.map(f), 0.5);
  const row = (name: string, rs: Run[], ratio: number, cpuRatio: number) => [
    name, med(rs, (r) => r.rps), med(rs, (r) => r.p50), med(rs, (r) => r.p99),
    rs.reduce((s, r) => s + r.completed - r.ok2xx, 0), ratio, med(rs, (r) => r.cpuUs), cpuRatio,
  ];
  const ratio = quantile(ratios, 0.5);
  const cpuRatio = quantile(cpuRatios, 0.5);
  printTable(
    `cache hit vs bare route: ${connections} connections, ${rounds} rounds of ${seconds} s per side, ${body.length}-byte body (medians)`,
    ['server', 'req/s', 'p50 ms', 'p99 ms', 'non-2xx', 'ratio', 'server CPU us/req', 'CPU ratio'],
    [row('bare Fastify route (reference)', runs.bare, 1, 1), row('rendition, cache hit', runs.hit, ratio, cpuRatio)],
  );
  console.log(`per-round ratios: ${ratios.map((r) => r.toFixed(2)).join(' ')}`);
  console.log(`per-round CPU ratios (bare CPU per request / hit CPU per request): ${cpuRatios.map((r) => r.toFixed(2)).join(' ')}`);
  console.log(`\nhit / bare = ${ratio.toFixed(2)} (median; target >= 0.80): ${ratio >= 0.8 ? 'met' : 'NOT met'}`);
} finally {
  await Promise.all([app.stop(), bare?.stop()]);
}
