/**
 * What a rendition costs the service in CPU, through HTTP, by thread: the service started as
 * `npm start` starts it, a fresh cache, then new pictures one at a time (each a first
 * rendition at 800 px: decode, analysis, resample, encode) and further widths of them. Each
 * request's CPU is read from /proc/<pid>/task/<tid>/stat (Linux; utime + stime in clock ticks,
 * 10 ms, so the figures are totals over the pictures divided by their count) and set against
 * sharp's decode-only CPU of the same bytes in this process. On a two-core machine the wall
 * time of a render cannot be less than half its CPU: this says how far the work itself, not
 * its scheduling, is from a target.
 *   npx tsx scripts/bench/cpu.ts [--pictures 6] [--width 800] [--further 1024]
 * Loopback only, bounded (2 x pictures requests).
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { benchJpeg } from './texture.js';
import { decodeRaw } from './decode.js';
import { timeRuns } from './timing.js';
import { startService, warmClient } from './serve.js';

const { values: flags } = parseArgs({ options: { pictures: { type: 'string', default: '6' }, width: { type: 'string', default: '800' }, further: { type: 'string', default: '1024' } } });
const count = Math.min(20, Math.max(2, Number(flags.pictures)));
const TICK_MS = 10; // USER_HZ = 100 on Linux

type Group = 'main' | 'libvips' | 'other';

/**
 * CPU ms so far of each thread of `pid`, grouped: the event loop, libvips' threads, the rest
 * (pool workers, libuv, V8); `sys` the part of it spent in the kernel (stime: page faults,
 * the spool file's writes and reads, futexes), which on a virtual machine that returns freed
 * memory to its host is where fresh memory shows.
 */
function threadCpu(pid: number): { all: Record<Group, number>; sys: Record<Group, number> } {
  const out = { all: { main: 0, libvips: 0, other: 0 }, sys: { main: 0, libvips: 0, other: 0 } };
  for (const tid of readdirSync(`/proc/${pid}/task`)) {
    let stat: string;
    try {
      stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, 'latin1');
    } catch {
      continue; // a thread that ended meanwhile
    }
    const comm = stat.slice(stat.indexOf('(') + 1, stat.lastIndexOf(')'));
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    const group = Number(tid) === pid ? 'main' : comm.startsWith('libvips') ? 'libvips' : 'other';
    out.all[group] += (Number(f[11]) + Number(f[12])) * TICK_MS;
    out.sys[group] += Number(f[12]) * TICK_MS;
  }
  return out;
}

const sourceDir = mkdtempSync(join(tmpdir(), 'foldwise-cpu-'));
const names: string[] = [];
for (let i = 0; i < count; i++) {
  const name = `cloth-${i}.jpg`;
  writeFileSync(join(sourceDir, name), await benchJpeg(2304, 1728, 200 + i));
  names.push(name);
}
const decode = await timeRuns(5, () => decodeRaw(readFileSync(join(sourceDir, names[0]))));
await warmClient();
const service = await startService(sourceDir);
try {
  const rows: string[] = [];
  for (const [label, width] of [[`first rendition -> ${flags.width} px`, flags.width], [`further width -> ${flags.further} px`, flags.further]] as const) {
    const before = threadCpu(service.pid);
    let wall = 0;
    for (const name of names) {
      const t = performance.now();
      const res = await fetch(`${service.url}/v1/renditions/${name}?width=${width}&format=jpeg`);
      await res.arrayBuffer();
      wall += performance.now() - t;
      if (res.status !== 200) throw new Error(`${name}: ${res.status}`);
    }
    const after = threadCpu(service.pid);
    const per = (k: Group, part: 'all' | 'sys' = 'all') => (after[part][k] - before[part][k]) / names.length;
    const total = per('main') + per('libvips') + per('other');
    const sys = per('main', 'sys') + per('libvips', 'sys') + per('other', 'sys');
    const cell = (k: Group) => `${per(k).toFixed(0)} (${per(k, 'sys').toFixed(0)})`;
    rows.push(`| ${label} | ${(wall / names.length).toFixed(0)} ms | ${total.toFixed(0)} ms (${(total / decode.cpu).toFixed(2)}x), ${sys.toFixed(0)} ms in the kernel | ${cell('main')} | ${cell('libvips')} | ${cell('other')} |`);
  }
  console.log(`${count} new 4.0 MP pictures, one request at a time; sharp's decode-only of one: ${decode.wall.toFixed(1)} ms wall, ${decode.cpu.toFixed(1)} ms CPU (this process)`);
  console.log('| request | wall (mean) | service CPU per request (x decode CPU) | event loop ms (kernel) | libvips threads ms (kernel) | workers, libuv, V8 ms (kernel) |');
  console.log('|---|---|---|---|---|---|');
  for (const r of rows) console.log(r);
} finally {
  await service.stop();
  rmSync(sourceDir, { recursive: true, force: true });
}
