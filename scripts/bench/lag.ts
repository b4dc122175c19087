/**
 * The event loop under a load of new pictures, two ways (service.ts): the lag `/metrics`
 * reports (prom-client's monitor, which records the time between two samples of
 * LAG_SAMPLE_MS, src/http/plugins/metrics.ts) with what lies beyond the sample period, and
 * what a visitor meets under such a load: a cached rendition asked again and again while
 * another load of new pictures renders, against the same asked while nothing renders.
 */
import { setTimeout as sleep } from 'node:timers/promises';
import { quantile } from '../../load/lib/stats.js';
import { LAG_SAMPLE_MS } from '../../src/http/plugins/metrics.js';
import { timedFetch } from './serve.js';

/** One run: the lag's p99 and max (ms, as /metrics reports them), and the hits' wall times (ms). */
export interface LagRun {
  p99: number;
  max: number;
  /** A cached rendition's GETs while another load of new pictures rendered. */
  busyHits: number[];
  /** The same GETs while nothing rendered. */
  idleHits: number[];
}

/** Pause between two probing GETs: a visitor every so often, not a load of its own. */
export const PROBE_PAUSE_MS = 20;

/**
 * GETs of `url` (a rendition the cache holds), one after another with PROBE_PAUSE_MS between,
 * until `until` settles (at least one): their wall times. Fails when one was not a cache hit.
 */
export async function probeHits(url: string, until: Promise<unknown>): Promise<number[]> {
  let done = false;
  void until.then(() => (done = true), () => (done = true));
  const ms: number[] = [];
  do {
    const r = await timedFetch(url);
    if (!/cache;desc="hit/.test(r.res.headers.get('server-timing') ?? '')) throw new Error(`${url} was not a cache hit: ${r.res.headers.get('server-timing')}`);
    ms.push(r.ms);
    await sleep(PROBE_PAUSE_MS);
  } while (!done);
  return ms;
}

/** The loop's lateness beyond the sample period, from a figure of /metrics (the time between two samples), in ms. */
export function lateBeyondSample(betweenSamplesMs: number): number {
  return Math.max(0, betweenSamplesMs - LAG_SAMPLE_MS);
}

/** The lag's lines of the bench's table, over the runs. */
export function lagLines(runs: LagRun[], pictures: string): string[] {
  const p99s = runs.map((l) => l.p99);
  const per = (xs: number[]) => xs.map((x) => x.toFixed(1)).join(' ');
  const busy = runs.flatMap((r) => r.busyHits);
  const idle = runs.flatMap((r) => r.idleHits);
  const ms = (xs: number[], q: number) => quantile(xs, q).toFixed(1);
  return [
    `event-loop lag while ${pictures} render, 3 at a time (/metrics: the time between two samples ${LAG_SAMPLE_MS} ms apart, so an idle loop reads ${LAG_SAMPLE_MS}): p99 median ${quantile(p99s, 0.5).toFixed(1)} ms (per run: ${per(p99s)}), max per run: ${per(runs.map((l) => l.max))} ms (target: p99 < 20 ms)`,
    `  late beyond the sample period: p99 median ${lateBeyondSample(quantile(p99s, 0.5)).toFixed(1)} ms (per run: ${per(p99s.map(lateBeyondSample))})`,
    `a cache hit asked every ${PROBE_PAUSE_MS} ms while another ${pictures} render, 3 at a time: median ${ms(busy, 0.5)} ms, p99 ${ms(busy, 0.99)} ms, max ${ms(busy, 1)} ms (${busy.length} hits); with nothing rendering: median ${ms(idle, 0.5)} ms, p99 ${ms(idle, 0.99)} ms (${idle.length} hits)`,
  ];
}
