import { createServer, type Server } from 'node:http';
import { once } from 'node:events';
import type { AddressInfo } from 'node:net';
import { setTimeout as sleep } from 'node:timers/promises';
import { afterEach, describe, expect, it } from 'vitest';
import { lagLines, lateBeyondSample, probeHits } from '../../scripts/bench/lag.js';
import { LAG_SAMPLE_MS } from '../../src/http/plugins/metrics.js';

let server: Server | undefined;
afterEach(() => new Promise<void>((resolve) => {
  server?.closeAllConnections();
  return server ? server.close(() => resolve()) : resolve();
}));

/** A loopback stand-in for the service answering with `timing`; `served` counts its requests. */
async function serve(timing: string, onRequest: (served: number) => void = () => undefined): Promise<string> {
  let served = 0;
  server = createServer((_req, res) => {
    onRequest(++served);
    res.setHeader('server-timing', timing).end('bytes');
  });
  server.listen(0, '127.0.0.1');
  await once(server, 'listening');
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}/v1/renditions/pinstripe.png?width=320`;
}

describe('the bench\'s event-loop lag (scripts/bench/lag.ts)', () => {
  it('counts only what lies beyond the sample period: an idle loop\'s 10 ms between samples is 0 late', () => {
    // Node's monitor records the spacing of its sampling timer (nodejs/node#34661): an idle
    // loop reads the period itself, 10 ms by default (prom-client's eventLoopMonitoringPrecision).
    expect(LAG_SAMPLE_MS).toBe(10);
    expect(lateBeyondSample(10)).toBe(0);
    expect(lateBeyondSample(9.2)).toBe(0);
    expect(lateBeyondSample(20.6)).toBeCloseTo(10.6, 9);
  });

  it('prints the p99 as /metrics reports it, its lateness, and the hits with and without renders', () => {
    const lines = lagLines([
      { p99: 20, max: 30, busyHits: [5, 6, 7, 40], idleHits: [2, 3] },
      { p99: 24, max: 35, busyHits: [8], idleHits: [4] },
    ], '6 new 4 MP pictures');
    expect(lines[0]).toContain('p99 median 20.0 ms (per run: 20.0 24.0), max per run: 30.0 35.0 ms');
    expect(lines[1]).toContain('late beyond the sample period: p99 median 10.0 ms (per run: 10.0 14.0)');
    expect(lines[2]).toContain('while another 6 new 4 MP pictures render, 3 at a time: median 7.0 ms, p99 40.0 ms, max 40.0 ms (5 hits); with nothing rendering: median 3.0 ms, p99 4.0 ms (3 hits)');
  });

  it('probes a cached rendition until the load is done, and refuses a miss as a probe', async () => {
    // The load ends as the third GET is answered: the probe stops after it, whatever the timing.
    let loadDone!: () => void;
    const load = new Promise<void>((resolve) => (loadDone = resolve));
    const hit = await serve('cache;desc="hit-memory";dur=0.02, origin;dur=0.10', (served) => served === 3 && loadDone());
    const ms = await probeHits(hit, load);
    expect(ms.length).toBe(3);
    expect(ms.every((x) => x > 0 && x < 60_000)).toBe(true);
    server!.closeAllConnections();
    server!.close();
    const miss = await serve('cache;desc="miss";dur=0.10, stream;dur=80.00');
    await expect(probeHits(miss, sleep(50))).rejects.toThrow(/was not a cache hit/);
  });
});
