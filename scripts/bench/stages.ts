/**
 * Where the time of a through-HTTP request goes: the same requests as the service section of
 * `npm run bench` (service.ts), each printed with its wall time, its ratio to sharp's
 * decode-only time of the same bytes (this run) and the service's own Server-Timing stages.
 *   npx tsx scripts/bench/stages.ts [--runs 3] [--cpu-prof <folder>]
 * With --cpu-prof the server writes a V8 CPU profile per thread into the folder when it stops.
 * Loopback only, bounded (a few dozen requests).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { benchJpeg } from './texture.js';
import { decodeRaw } from './decode.js';
import { timeRuns } from './timing.js';
import { startService, timedFetch, warmClient } from './serve.js';
import { pictures, rendition } from './service.js';

const { values: flags } = parseArgs({ options: { runs: { type: 'string', default: '3' }, 'cpu-prof': { type: 'string' } } });
const runs = Math.min(10, Math.max(1, Number(flags.runs)));
const profile = flags['cpu-prof'] ? ['--cpu-prof', `--cpu-prof-dir=${resolve(flags['cpu-prof'])}`] : [];

const sourceDir = mkdtempSync(join(tmpdir(), 'foldwise-stages-'));
for (const [name, w, h, seed] of pictures) writeFileSync(join(sourceDir, name), await benchJpeg(w, h, seed));
const bytes = Object.fromEntries(pictures.map(([name]) => [name, readFileSync(join(sourceDir, name))]));
const requests: Array<[string, string, number]> = [
  ['first request after start', 'first-4mp.jpg', 800],
  ['first rendition, new', 'new-4mp.jpg', 800], ['first rendition, new', 'new-6mp.jpg', 800], ['first rendition, new', 'new-15mp.jpg', 800],
  ['further width', 'new-6mp.jpg', 640], ['further width', 'new-6mp.jpg', 1024],
  ['further width', 'new-15mp.jpg', 640], ['further width', 'new-15mp.jpg', 1024],
];
await warmClient();
try {
  for (let run = 0; run < runs; run++) {
    const decode: Record<string, number> = {};
    for (const [name] of pictures) decode[name] = (await timeRuns(3, () => decodeRaw(bytes[name]))).wall;
    const service = await startService(sourceDir, profile);
    console.log(`run ${run + 1}: sharp decode-only ${Object.entries(decode).map(([n, ms]) => `${n} ${ms.toFixed(0)} ms`).join(', ')}`);
    try {
      for (const [label, name, width] of requests) {
        const { ms, res, bytes: n } = await timedFetch(service.url + rendition(name, width));
        const stages = res.headers.get('server-timing') ?? '';
        console.log(`  ${label} ${name} -> ${width}: ${ms.toFixed(0)} ms = ${(ms / decode[name]).toFixed(2)}x, ${n} B | ${stages.replace(/;desc="([^"]*)"/, '($1)').replace(/;dur=/g, ' ')}`);
        console.log(`    plan: ${res.headers.get('rendition-plan')}`);
      }
    } finally {
      await service.stop();
    }
  }
} finally {
  rmSync(sourceDir, { recursive: true, force: true });
}
