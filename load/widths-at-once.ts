/**
 * Several widths of one new picture asked at once, as visitors on screens of other sizes ask
 * them when a page goes live: the service in its own process on 127.0.0.1, with its default
 * settings (the renditions decode the picture once and the others resample its kept decode,
 * `cache.decodedBytes`), and once with `cache.decodedBytes` 0 (each decodes it). Each of 8 new
 * 6.4 MP JPEGs is asked at 480, 640, 828 and 1080 px at once, one picture after the other;
 * prints per setting the time until all four are answered (median and range), how many answers
 * decoded (`Server-Timing` names `stream`), and the statuses. Bounded: 8 pictures per setting,
 * three rounds of both settings.
 *   npx tsx load/widths-at-once.ts
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { benchJpeg } from '../scripts/bench/texture.js';
import { startChild } from './lib/child.js';
import { loadConfigFile } from './lib/config-file.js';
import { quantile } from './lib/stats.js';
import { printTable } from './lib/table.js';

const PICTURES = 8;
const ROUNDS = 3;
const WIDTHS = [480, 640, 828, 1080];
const dir = mkdtempSync(join(tmpdir(), 'foldwise-widths-'));
const total = PICTURES * ROUNDS * 2;
console.log(`making ${total} 3200x2000 JPEGs (synthetic weaves)...`);
for (let i = 0; i < total; i++) writeFileSync(join(dir, `cloth-${i}.jpg`), await benchJpeg(3200, 2000, 900 + i));
writeFileSync(join(dir, 'warm.jpg'), await benchJpeg(3200, 2000, 899));

const rows: Array<Array<string | number>> = [];
let next = 0;
for (let round = 0; round < ROUNDS; round++) {
  for (const decodedBytes of [null, 0]) {
    const cache = decodedBytes === null ? {} : { cache: { decodedBytes } };
    // Shedding on event-loop delay off: this measures renders, not shedding.
    const server = await startChild('app', { FOLDWISE_CONFIG: loadConfigFile(dir, { ...cache, pressure: { maxEventLoopDelayMs: 0 } }) });
    try {
      await (await fetch(`${server.url}/v1/renditions/warm.jpg?width=800&format=jpeg`)).arrayBuffer();
      const walls: number[] = [];
      let decoded = 0;
      const statuses = new Map<number, number>();
      for (let p = 0; p < PICTURES; p++) {
        const name = `cloth-${next++}.jpg`;
        const start = performance.now();
        await Promise.all(
          WIDTHS.map(async (w) => {
            const res = await fetch(`${server.url}/v1/renditions/${name}?width=${w}&format=jpeg`);
            await res.arrayBuffer();
            statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
            if (/(^|, )stream;/.test(res.headers.get('server-timing') ?? '')) decoded++;
          }),
        );
        walls.push(performance.now() - start);
      }
      const label = decodedBytes === null ? 'default (kept decodes)' : 'cache.decodedBytes 0';
      const ms = (q: number) => Math.round(quantile(walls, q));
      rows.push([round + 1, label, ms(0.5), `${ms(0)}-${ms(1)}`, `${decoded} / ${PICTURES * WIDTHS.length}`, [...statuses].map(([s, n]) => `${n} x ${s}`).join(', ')]);
    } finally {
      await server.stop();
    }
  }
}
printTable(`${WIDTHS.length} widths of a new 6.4 MP picture asked at once (${WIDTHS.join(', ')} px JPEG), ${PICTURES} pictures per row`, ['round', 'setting', 'all answered ms (median)', 'range', 'answers that decoded', 'statuses'], rows);
