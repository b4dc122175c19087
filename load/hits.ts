/**
 * Cache-hit and miss-mix throughput of the rendition endpoint, with p50 and p99, against the
 * service in its own process on 127.0.0.1. The reference is the hit-only run of this same run:
 * the mix row's ratio says what a given share of misses costs.
 *   npx tsx load/hits.ts [--seconds 5] [--connections 16] [--miss-every 10] [--mix-requests 160]
 * Bounded: fixed durations and a fixed request count; loopback only (load/lib/cannon.ts).
 */
import { parseArgs } from 'node:util';
import { cannon, type CannonRun } from './lib/cannon.js';
import { startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { makeSources } from './lib/sources.js';
import { printTable } from './lib/table.js';

const { values } = parseArgs({
  options: {
    seconds: { type: 'string', default: '5' },
    connections: { type: 'string', default: '16' },
    'miss-every': { type: 'string', default: '10' },
    'mix-requests': { type: 'string', default: '160' },
  },
});
const seconds = Math.min(30, Math.max(1, Number(values.seconds)));
const connections = Math.min(128, Math.max(1, Number(values.connections)));
const missEvery = Math.max(2, Number(values['miss-every']));
const mixRequests = Math.min(5000, Math.max(connections, Number(values['mix-requests'])));

const { dir, names } = await makeSources(1);
const hot = `/v1/renditions/${names[0]}?width=800&format=webp`;
const app = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir) });
try {
  const first = await fetch(app.url + hot);
  if (first.status !== 200) throw new Error(`rendition answered ${first.status}: ${await first.text()}`);
  const bytes = (await first.arrayBuffer()).byteLength;
  console.log(`miss: Server-Timing ${first.headers.get('server-timing')}`);
  const again = await fetch(app.url + hot);
  await again.arrayBuffer();
  console.log(`hit:  Server-Timing ${again.headers.get('server-timing')}`);

  // Mix: every `missEvery`-th request (counted across all connections) asks for a width nobody
  // asked for before, so each of those is a real miss; the rest ask for the hot rendition.
  let sent = 0;
  let nextWidth = 300;
  const nextPath = () => {
    sent += 1;
    return sent % missEvery === 0 ? `/v1/renditions/${names[0]}?width=${nextWidth++}&format=webp` : hot;
  };
  await cannon({ url: app.url + hot, connections, duration: 1 }); // warm-up (JIT, sockets)
  const hit: CannonRun = await cannon({ url: app.url + hot, connections, duration: seconds });
  const mix: CannonRun = await cannon({ url: app.url + hot, connections, amount: mixRequests, nextPath });
  const misses = nextWidth - 300;
  const row = (name: string, r: CannonRun) => [
    name, r.completed, r.rps, r.p50, r.p99, r.completed - r.ok2xx, r.rps / hit.rps,
  ];
  printTable(
    `rendition throughput: ${connections} connections, ${bytes}-byte WebP of a 12 MP source`,
    ['scenario', 'requests', 'req/s', 'p50 ms', 'p99 ms', 'non-2xx', 'ratio'],
    [
      row(`cache hits only, ${seconds} s (reference)`, hit),
      row(`mix: 1 in ${missEvery} a new width (${misses} misses)`, mix),
    ],
  );
  if (mix.s503 > 0) console.log(`\n${mix.s503} answers were 503 (render queue bound reached): by design under overload.`);
} finally {
  await app.stop();
}
