/**
 * The timeline of a first rendition through HTTP: the service started as `npm start` starts
 * it, with FOLDWISE_TIMELINE=1 (src/pool/trace.ts), answers each request with the spans of
 * its render on every thread (main, libvips' decode, each pool worker); printed as a table and
 * an ASCII timeline from the request's send to its last byte, with how long one, two or more
 * threads were working (on two cores, time with one working thread is a core sitting idle).
 *   npx tsx scripts/bench/timeline.ts [--runs 1] [--width 800] [--further 640,1024]
 * --further: after each first rendition, these widths of the same picture (already analysed).
 * Loopback only, bounded (a few requests per run).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import type { Mark } from '../../src/pool/trace.js';
import { benchJpeg } from './texture.js';
import { startService, warmClient } from './serve.js';
import { pictures, rendition } from './service.js';

const { values: flags } = parseArgs({ options: { runs: { type: 'string', default: '1' }, width: { type: 'string', default: '800' }, further: { type: 'string', default: '' } } });
const runs = Math.min(10, Math.max(1, Number(flags.runs)));
const width = Number(flags.width);
const further = flags.further ? flags.further.split(',').map(Number) : [];
const COLUMNS = 100;

interface Timeline { arrived: number; answered: number; mainActiveMs: number; marks: Mark[] }

/** Work spans per thread, waits taken out: the libvips decode, the encode, each worker's tasks. */
function working(t: Timeline): Map<string, Array<[number, number]>> {
  const lanes = new Map<string, Array<[number, number]>>();
  const add = (thread: string, a: number, b: number) => b > a && (lanes.get(thread) ?? lanes.set(thread, []).get(thread)!).push([a, b]);
  for (const m of t.marks) {
    if (m.thread === 'decode') add('decode', m.start, m.end);
    else if (m.thread === 'main' && m.what === 'encode') add('encode', m.start, m.end);
    else if (m.thread.startsWith('w') && m.what !== 'wait for rows') {
      // A task's span less the waits inside it on the same thread.
      const waits = t.marks.filter((w) => w.thread === m.thread && w.what === 'wait for rows' && w.start >= m.start && w.end <= m.end).sort((a, b) => a.start - b.start);
      let at = m.start;
      for (const w of waits) { add(m.thread, at, w.start); at = Math.max(at, w.end); }
      add(m.thread, at, m.end);
    }
  }
  return lanes;
}

/** Milliseconds with exactly k threads working, k = 0, 1, 2, 3+ (from the request's send to its last byte). */
function concurrency(lanes: Map<string, Array<[number, number]>>, from: number, to: number): number[] {
  const edges: Array<[number, number]> = [];
  for (const spans of lanes.values()) for (const [a, b] of spans) edges.push([Math.max(a, from), 1], [Math.min(b, to), -1]);
  edges.sort((x, y) => x[0] - y[0] || x[1] - y[1]);
  const ms = [0, 0, 0, 0];
  let level = 0;
  let at = from;
  for (const [t, d] of edges) { ms[Math.min(level, 3)] += t - at; at = t; level += d; }
  ms[Math.min(level, 3)] += to - at;
  return ms;
}

function bar(spans: Array<[number, number]>, from: number, to: number, ch: string): string {
  const cells = Array<string>(COLUMNS).fill('.');
  for (const [a, b] of spans) {
    const i0 = Math.max(0, Math.floor(((a - from) / (to - from)) * COLUMNS));
    const i1 = Math.min(COLUMNS, Math.ceil(((b - from) / (to - from)) * COLUMNS));
    for (let i = i0; i < i1; i++) cells[i] = ch;
  }
  return cells.join('');
}

function print(label: string, sent: number, done: number, t: Timeline): void {
  const rel = (x: number) => (x - sent).toFixed(1).padStart(6);
  console.log(`\n${label}: ${(done - sent).toFixed(1)} ms at the client; main thread active ${t.mainActiveMs.toFixed(1)} ms of the handler's ${(t.answered - t.arrived).toFixed(1)} ms`);
  console.log('| thread | what | start | end | ms |\n|---|---|---|---|---|');
  const waits = new Map<string, number>();
  for (const m of [...t.marks].sort((a, b) => a.start - b.start)) {
    if (m.what === 'wait for rows') { waits.set(m.thread, (waits.get(m.thread) ?? 0) + m.end - m.start); continue; }
    console.log(`| ${m.thread} | ${m.what} | ${rel(m.start)} | ${rel(m.end)} | ${(m.end - m.start).toFixed(1)} |`);
  }
  for (const [thread, ms] of waits) console.log(`| ${thread} | waited for rows (in total) | | | ${ms.toFixed(1)} |`);
  const lanes = working(t);
  console.log(`  ${'request'.padEnd(8)} ${bar([[t.arrived, t.answered]], sent, done, '=')}  (handler: arrival to answer)`);
  for (const m of t.marks.filter((x) => x.thread === 'main')) console.log(`  ${m.what.slice(0, 8).padEnd(8)} ${bar([[m.start, m.end]], sent, done, '-')}  (main awaits)`);
  for (const [thread, spans] of lanes) console.log(`  ${thread.padEnd(8)} ${bar(spans, sent, done, '#')}  ${spans.reduce((s, [a, b]) => s + b - a, 0).toFixed(1)} ms working`);
  const k = concurrency(lanes, sent, done);
  console.log(`  threads working: none ${k[0].toFixed(1)} ms, one ${k[1].toFixed(1)} ms, two ${k[2].toFixed(1)} ms, three or more ${k[3].toFixed(1)} ms`);
}

process.env.FOLDWISE_TIMELINE = '1';
const sourceDir = mkdtempSync(join(tmpdir(), 'foldwise-timeline-'));
for (const [name, w, h, seed] of pictures) writeFileSync(join(sourceDir, name), await benchJpeg(w, h, seed));
await warmClient();
try {
  for (let run = 0; run < runs; run++) {
    const service = await startService(sourceDir);
    try {
      for (const [name, w] of pictures.flatMap(([name]) => [[name, width], ...further.map((f) => [name, f])] as Array<[string, number]>)) {
        const sent = performance.timeOrigin + performance.now();
        const res = await fetch(service.url + rendition(name, w));
        await res.arrayBuffer();
        const done = performance.timeOrigin + performance.now();
        const header = res.headers.get('rendition-timeline');
        if (res.status !== 200 || !header) throw new Error(`${name}: ${res.status}, no timeline (is FOLDWISE_TIMELINE honoured?)`);
        const kind = w !== width ? 'further width' : name === pictures[0][0] ? 'first request after start' : 'first rendition';
        const label = `run ${run + 1}, ${kind} ${name} -> ${w} px`;
        print(label, sent, done, JSON.parse(header) as Timeline);
        console.log(`  plan: ${res.headers.get('rendition-plan')}`);
      }
    } finally {
      await service.stop();
    }
  }
} finally {
  rmSync(sourceDir, { recursive: true, force: true });
}
