/**
 * Two replicas of the service (each its own process) sharing one redis-server, all on
 * 127.0.0.1, hammered at the same time with the same few renditions. Prints, from the
 * replicas' own /metrics, how many renders each distinct rendition cost (target: exactly 1),
 * with the plain request count as the reference it is measured against.
 *   npx tsx load/two-replicas.ts [--requests 400] [--connections 16]
 */
import { parseArgs } from 'node:util';
import { startRedis } from '../test/helpers/redis-server.js';
import { cannon, type CannonRun } from './lib/cannon.js';
import { startChild, type ChildServer } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { makeSources } from './lib/sources.js';
import { printTable } from './lib/table.js';

const { values } = parseArgs({ options: { requests: { type: 'string', default: '400' }, connections: { type: 'string', default: '16' } } });
const amount = Math.min(5_000, Number(values.requests));
const connections = Math.min(128, Number(values.connections));

const { dir, names } = await makeSources(2);
const paths = names.flatMap((n) => [480, 640, 800].map((w) => `/v1/renditions/${n}?width=${w}&format=jpeg`));
const redis = await startRedis();
const replicas: ChildServer[] = [];
try {
  const config = loadConfigFile(dir, { cache: { diskBytes: 0 } });
  for (let i = 0; i < 2; i++) replicas.push(await startChild('app', { FOLDWISE_CONFIG: config, FOLDWISE_REDIS_URL: redis.url }));
  // Both replicas at once, each connection cycling through the same renditions.
  const runs: CannonRun[] = await Promise.all(
    replicas.map((r) => cannon({ url: r.url, connections, amount, paths, timeoutSeconds: 120 })),
  );
  const counters = await Promise.all(replicas.map(scrape));
  const sum = (f: (c: Record<string, number>) => number) => counters.reduce((s, c) => s + f(c), 0);
  const renders = sum((c) => c['foldwise_render_stage_seconds_count{stage="resample"}'] ?? 0);
  const rows = replicas.map((_, i) => {
    const c = counters[i];
    return [
      `replica ${i + 1}`, runs[i].ok2xx, runs[i].completed - runs[i].ok2xx,
      c['foldwise_render_stage_seconds_count{stage="resample"}'] ?? 0,
      c['foldwise_replica_flight_total{event="leader"}'] ?? 0, c['foldwise_replica_flight_total{event="wait"}'] ?? 0,
      c['foldwise_replica_flight_total{event="solo"}'] ?? 0,
      c['foldwise_cache_lookups_total{result="hit-memory"}'] ?? 0, c['foldwise_cache_lookups_total{result="hit-redis"}'] ?? 0,
    ];
  });
  printTable(
    `two replicas sharing one Redis: ${paths.length} distinct renditions of 12 MP sources, ${amount} requests x ${connections} connections per replica`,
    ['replica', '2xx', 'other', 'renders', 'lock taken', 'waited', 'solo', 'hit memory', 'hit redis'],
    rows,
  );
  printTable('renders per distinct rendition (reference: requests per distinct rendition)', ['figure', 'value', 'per rendition'], [
    ['requests answered 2xx (reference)', runs.reduce((s, r) => s + r.ok2xx, 0), runs.reduce((s, r) => s + r.ok2xx, 0) / paths.length],
    ['renders, both replicas', renders, renders / paths.length],
  ]);
  console.log(`\nrenders per distinct rendition = ${(renders / paths.length).toFixed(2)} (target 1): ${renders === paths.length ? 'met' : 'NOT met'}`);
} finally {
  await Promise.all(replicas.map((r) => r.stop()));
  await redis.stop();
}

/** The replica's Prometheus counters as `name{labels}` -> value. */
async function scrape(r: ChildServer): Promise<Record<string, number>> {
  const text = await (await fetch(`${r.url}/metrics`)).text();
  const out: Record<string, number> = {};
  for (const line of text.split('\n')) {
    const m = /^(foldwise_[a-z_]+(?:\{[^}]*\})?) ([0-9.e+-]+)$/.exec(line);
    if (m) out[m[1]] = Number(m[2]);
  }
  return out;
}
