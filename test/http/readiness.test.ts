import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createFolderOrigin } from '../../src/origins/folder.js';
import { build, type TestApp } from '../helpers/build.js';
import { eventCount, gatedOrigin } from '../helpers/gated-origin.js';
import { writePng } from '../helpers/images.js';
import { until } from '../faults/pool-tap.js';

const cacheOf = (res: { headers: Record<string, unknown> }) => /cache;desc="([^"]+)"/.exec(String(res.headers['server-timing']))?.[1];

// Readiness answers "can this replica serve", hits included; a miss flood that fills every
// render slot must not take it out of the balancer (seen: /readyz 503 in 18 of 28 samples
// while hits were 200 in 28 of 28).
describe('/readyz during a miss flood', () => {
  let dir: string;
  let t: TestApp;
  let gated: ReturnType<typeof gatedOrigin>;

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-ready-'));
    for (let i = 0; i < 6; i++) await writePng(dir, `s${i}.png`, 32, 32, 3, (x, y) => [x * 8, y * 8, i * 40]);
    gated = gatedOrigin(createFolderOrigin(dir));
    // One worker and one waiting render: two misses fill every slot.
    t = await build({ sourceDir: dir, origin: gated.origin, config: { pool: { threads: 1, maxQueue: 1 } } });
  });
  afterAll(async () => {
    gated.release();
    await t.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('stays 200 while every render slot is taken, and hits keep being served', async () => {
    gated.release();
    const hitUrl = '/v1/renditions/s0.png?width=16&format=png';
    expect((await t.app.inject({ url: hitUrl })).statusCode).toBe(200);
    gated.reset();

    // The flood fills every slot: as many read their sources as can run and wait (two to run,
    // one to wait), the other two wait unread in the lobby.
    const reads = eventCount(gated.events, 'read', 3);
    const flood = Array.from({ length: 5 }, (_, i) => t.app.inject({ url: `/v1/renditions/s${i + 1}.png?width=16&format=png` }));
    await reads;
    await until(() => t.app.renderPool.memory().lobby === 2);
    expect(gated.state.reads).toBe(3);

    const ready = await t.app.inject({ url: '/readyz' });
    expect(ready.statusCode).toBe(200);
    expect(ready.json()).toMatchObject({ status: 'ready', checks: { pool: { ok: true, detail: expect.stringMatching(/^\d+ of \d+ MiB admitted; \d+ jobs running, \d+ waiting$/) } } });
    const hit = await t.app.inject({ url: hitUrl });
    expect(hit.statusCode).toBe(200);
    expect(cacheOf(hit)).toBe('hit-memory');

    gated.release();
    // Once the reads go on, every one of them is rendered.
    expect((await Promise.all(flood)).map((r) => r.statusCode)).toEqual([200, 200, 200, 200, 200]);
  });
});

/** /v1/sources once the app sheds load: a bounded wait for under-pressure's first sample (it starts at zero). */
async function shedding(t: TestApp) {
  let shed = await t.app.inject({ url: '/v1/sources' });
  for (let i = 0; i < 500 && shed.statusCode !== 503; i++) {
    await new Promise<void>((resolve) => setImmediate(resolve));
    shed = await t.app.inject({ url: '/v1/sources' });
  }
  expect(shed.statusCode).toBe(503);
  return shed;
}

describe('/readyz under load shedding', () => {
  it('is not shed (the replica still serves hits), while other routes are', async () => {
    // A heap limit of one byte: every sample is over it, so shedding is on from the first sample.
    const t = await build({ config: { pressure: { maxHeapUsedBytes: 1, sampleIntervalMs: 5 } } });
    try {
      const shed = await shedding(t);
      expect(shed.json().code).toBe('ERR_OVERLOADED');
      const ready = await t.app.inject({ url: '/readyz' });
      expect(ready.statusCode).toBe(200);
      expect(ready.json().status).toBe('ready');
    } finally {
      await t.close();
    }
  });

  it('still serves rendition hits; a rendition miss gets the 503 (issue 18: >= 99 % of hits during a flood)', async () => {
    // The hit comes from the disk tier of a first service that rendered it without pressure.
    const own = await mkdtemp(join(tmpdir(), 'foldwise-shed-'));
    const cache = { cache: { dir: join(own, 'cache') } };
    const first = await build({ sourceDir: own, config: cache });
    await writePng(own, 'weave.png', 64, 48, 3, (x, y) => [(x * 16) & 255, (y * 16) & 255, ((x ^ y) * 8) & 255]);
    const made = await first.app.inject({ url: '/v1/renditions/weave.png?width=32&format=png' });
    expect(made.statusCode).toBe(200);
    await first.close();
    const t = await build({ sourceDir: own, config: { ...cache, pressure: { maxHeapUsedBytes: 1, sampleIntervalMs: 5 } } });
    try {
      await shedding(t);
      const hit = await t.app.inject({ url: '/v1/renditions/weave.png?width=32&format=png' });
      expect(hit.statusCode).toBe(200);
      expect(cacheOf(hit)).toBe('hit-disk');
      expect(hit.rawPayload.equals(made.rawPayload)).toBe(true);
      const miss = await t.app.inject({ url: '/v1/renditions/weave.png?width=31&format=png' });
      expect(miss.statusCode).toBe(503);
      expect(miss.json().code).toBe('ERR_OVERLOADED');
      expect(miss.headers['retry-after']).toBe(String(t.config.pressure.retryAfterSeconds));
    } finally {
      await t.close();
      await rm(own, { recursive: true, force: true });
    }
  });

  it('a sample shorter than the event-loop limit that saw no tick does not shed (issue 18: b, e, f)', async () => {
    // 5 ms samples against under-pressure's 10 ms ticks: many samples see none. That proves a
    // pause of one sample, not an event-loop delay over 1000 ms.
    const t = await build({ config: { pressure: { maxEventLoopDelayMs: 1000, sampleIntervalMs: 5 } } });
    try {
      const codes = new Set<number>();
      for (let i = 0; i < 200; i++) {
        codes.add((await t.app.inject({ url: '/v1/sources' })).statusCode);
        await new Promise<void>((resolve) => setTimeout(resolve, 1));
      }
      expect([...codes]).toEqual([200]);
    } finally {
      await t.close();
    }
  });
});
