/**
 * Bursts of new pictures asked at once, as a page of new pictures opened by a visitor or two:
 * the service in its own process on 127.0.0.1, with its default pool (two worker threads on a
 * two-core machine: four renders running, four waiting), once with the lobby (`pool.lobby`,
 * default) and once without it (`pool.lobby` 0). Each burst asks N pictures never rendered
 * before (2 MP JPEGs, 800 px wide), all at once; prints per burst the answers by status, the
 * time until the last answer and the slowest request. Bounded: 42 pictures per setting.
 * Target: no 503 for a burst the lobby holds (line + lobby); a browser shows a 503 as a broken image.
 *   npx tsx load/burst.ts
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { benchJpeg } from '../scripts/bench/texture.js';
import { startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { printTable } from './lib/table.js';

const BURSTS = [6, 12, 24];
const dir = mkdtempSync(join(tmpdir(), 'foldwise-burst-'));
const total = BURSTS.reduce((a, b) => a + b, 0);
console.log(`making ${total} 1600x1200 JPEGs (synthetic weaves)...`);
for (let i = 0; i < total; i++) writeFileSync(join(dir, `cloth-${i}.jpg`), await benchJpeg(1600, 1200, 700 + i));
writeFileSync(join(dir, 'warm.jpg'), await benchJpeg(1600, 1200, 699));

const rows: Array<Array<string | number>> = [];
for (const lobby of [null, 0]) {
  // Shedding on event-loop delay off: a burst is meant to meet the pool's own bounds.
  const pool = lobby === null ? {} : { pool: { lobby } };
  const server = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir, { ...pool, pressure: { maxEventLoopDelayMs: 0 } }) });
  try {
    await (await fetch(`${server.url}/v1/renditions/warm.jpg?width=800&format=jpeg`)).arrayBuffer();
    let next = 0;
    for (const n of BURSTS) {
      const names = Array.from({ length: n }, () => `cloth-${next++}.jpg`);
      const start = performance.now();
      const answers = await Promise.all(
        names.map(async (name) => {
          const t = performance.now();
          const res = await fetch(`${server.url}/v1/renditions/${name}?width=800&format=jpeg`);
          await res.arrayBuffer();
          return { status: res.status, ms: performance.now() - t };
        }),
      );
      const all = performance.now() - start;
      const count = (s: number) => answers.filter((a) => a.status === s).length;
      const other = answers.length - count(200) - count(503);
      rows.push([lobby === null ? 'default (32)' : String(lobby), n, count(200), count(503), other, Math.round(all), Math.round(Math.max(...answers.map((a) => a.ms)))]);
    }
  } finally {
    await server.stop();
  }
}
printTable('new pictures asked at once (2 MP -> 800 px JPEG)', ['pool.lobby', 'at once', '200', '503', 'other', 'all answered ms', 'slowest ms'], rows);
