/**
 * Admission by memory through HTTP (issue 18's cases): a source too costly for the budget is
 * refused with 413 and its numbers, one that fits is served without the admitted bytes ever
 * passing the budget, a job that cannot get room in time gets 503 with Retry-After, and a
 * client that leaves while its job waits frees its place. Jobs are held at the pool's door
 * (pool-tap.ts, injected as the pool's runner) and the tests wait on the pool's counters, never on sleeps.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { PoolTap, until } from '../faults/pool-tap.js';

const MiB = 2 ** 20;
const BUDGET = 128 * MiB;

/** A 16-bit RGBA PNG of zeros, `side` square: tiny on disk, `side`^2 x 8 bytes decoded. */
async function zeros16(side: number): Promise<Buffer> {
  return sharp({ create: { width: side, height: side, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
    .toColourspace('rgb16')
    .png({ compressionLevel: 9 })
    .toBuffer();
}

let t: TestApp;
const tap = new PoolTap();
let port = 0;
beforeAll(async () => {
  t = await build({ poolRunner: tap.runner, config: { pool: { memoryBudgetBytes: BUDGET, maxWaitMs: 60_000 } } });
  await writeFile(join(t.sourceDir, 'bomb.png'), await zeros16(8192));
  await writeFile(join(t.sourceDir, 'small.png'), await zeros16(2048));
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
});
afterAll(() => t.close());

describe('admission by memory', () => {
  it('an 8192x8192 16-bit RGBA PNG over the budget: 413 ERR_SOURCE_TOO_COSTLY with the numbers, nothing admitted', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/bomb.png?width=320&format=png' });
    expect(res.statusCode).toBe(413);
    const body = res.json() as { code: string; detail: string };
    expect(body.code).toBe('ERR_SOURCE_TOO_COSTLY');
    expect(body.detail).toContain('8192x8192 16-bit 4-channel');
    expect(body.detail).toContain(`(${BUDGET} bytes)`);
    expect(t.app.renderPool.memory().peakAdmittedBytes).toBe(0);
  });

  it('a source that fits is served; the admitted bytes never pass the budget and return to 0', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/small.png?width=320&format=png' });
    expect(res.statusCode).toBe(200);
    const meta = await sharp(res.rawPayload).metadata();
    expect([meta.width, meta.height, meta.depth]).toEqual([320, 320, 'ushort']);
    await until(() => t.app.renderPool.memory().admittedBytes === 0);
    const m = t.app.renderPool.memory();
    expect(m.peakAdmittedBytes).toBeGreaterThan(2048 * 2048 * 8);
    expect(m.peakAdmittedBytes).toBeLessThanOrEqual(BUDGET);
    // The staging pool keeps at most one idle buffer per thread.
    expect(m.stagingIdleBytes).toBeLessThanOrEqual(64 * MiB * t.app.renderPool.threads);
  });

  it('a client that leaves while its job waits for memory frees its place in line', async () => {
    const held = tap.holdNext();
    const first = t.app.inject({ url: '/v1/renditions/small.png?width=300&format=png' });
    await held.reachedPool;
    const req = http.request({ host: '127.0.0.1', port, path: '/v1/renditions/small.png?width=310&format=png', agent: false });
    req.on('error', () => undefined);
    req.end();
    await until(() => t.app.renderPool.memory().waiting === 1);
    req.destroy();
    await until(() => t.app.renderPool.memory().waiting === 0);
    held.release();
    expect((await first).statusCode).toBe(200);
    await until(() => t.app.renderPool.memory().admittedBytes === 0);
    expect(t.app.renderPool.inFlight).toBe(0);
  });
});

describe('a bounded wait', () => {
  it('a job that cannot get room within maxWaitMs gets 503 ERR_OVERLOADED with Retry-After', async () => {
    const quickTap = new PoolTap();
    const quick = await build({ sourceDir: t.sourceDir, poolRunner: quickTap.runner, config: { pool: { memoryBudgetBytes: BUDGET, maxWaitMs: 0 } } });
    try {
      const { reachedPool, release } = quickTap.holdNext();
      const first = quick.app.inject({ url: '/v1/renditions/small.png?width=200&format=png' });
      await reachedPool;
      const second = await quick.app.inject({ url: '/v1/renditions/small.png?width=210&format=png' });
      expect(second.statusCode).toBe(503);
      expect(second.json()).toMatchObject({ code: 'ERR_OVERLOADED' });
      expect(second.headers['retry-after']).toBe(String(quick.config.pool.retryAfterSeconds));
      release();
      expect((await first).statusCode).toBe(200);
      await until(() => quick.app.renderPool.memory().admittedBytes === 0);
    } finally {
      await quick.close();
    }
  });
});

/**
 * A service with one thread, so two jobs run at once (pool/options.ts runningPerThread) and one
 * may wait, whose first two requests (widths `w` and `w + 1`) are held at the pool's door;
 * `reads` counts the origin's reads, each of which first waits for `gate` when one is given.
 */
async function lineOfOne(w: number, gate?: Promise<void>, lobby = 0) {
  const lineTap = new PoolTap();
  const full = await build({ sourceDir: t.sourceDir, poolRunner: lineTap.runner, config: { pool: { threads: 1, maxQueue: 1, memoryBudgetBytes: 8 * BUDGET, maxWaitMs: 60_000, lobby } } });
  const origin = full.app.renderContext.origin;
  const read = origin.read.bind(origin);
  const counted = { reads: 0, gated: false };
  origin.read = async (...args: Parameters<typeof read>) => {
    counted.reads += 1;
    if (counted.gated) await gate;
    return read(...args);
  };
  const ask = (width: number) => full.app.inject({ url: `/v1/renditions/small.png?width=${width}&format=png` });
  const a = lineTap.holdNext();
  const first = ask(w);
  await a.reachedPool;
  const b = lineTap.holdNext();
  const second = ask(w + 1);
  await b.reachedPool;
  return { full, counted, ask, held: [first, second], release: () => (a.release(), b.release()) };
}

describe('a full wait line (pool.lobby 0)', () => {
  it('refuses a request with 503 ERR_OVERLOADED before its source is read', async () => {
    const { full, counted, ask, held: [first, second], release } = await lineOfOne(200);
    try {
      const third = ask(202);
      await until(() => full.app.renderPool.memory().waiting === 1);
      expect(counted.reads).toBe(3);
      const fourth = await ask(203);
      expect(fourth.statusCode).toBe(503);
      expect(fourth.json()).toMatchObject({ code: 'ERR_OVERLOADED' });
      expect(fourth.headers['retry-after']).toBe(String(full.config.pool.retryAfterSeconds));
      expect(counted.reads).toBe(3);
      release();
      expect([(await first).statusCode, (await second).statusCode, (await third).statusCode]).toEqual([200, 200, 200]);
      expect(counted.reads).toBe(3);
    } finally {
      await full.close();
    }
  });

  it('while no job can start at once, reads one source per free place in line: the other requests arriving meanwhile are refused unread', async () => {
    let open!: () => void;
    const gate = new Promise<void>((resolve) => (open = resolve));
    const { full, counted, ask, held: [first, second], release } = await lineOfOne(300, gate);
    try {
      // From here every origin read waits at the gate, so none of the next requests reaches
      // admission meanwhile: before reservations all three read their source (the line was empty).
      counted.gated = true;
      counted.reads = 0;
      const third = ask(302);
      await until(() => counted.reads === 1);
      const late = await Promise.all([303, 304].map(ask));
      expect(late.map((r) => [r.statusCode, r.json().code])).toEqual([[503, 'ERR_OVERLOADED'], [503, 'ERR_OVERLOADED']]);
      expect(late[0].headers['retry-after']).toBe(String(full.config.pool.retryAfterSeconds));
      expect(counted.reads).toBe(1);
      open();
      await until(() => full.app.renderPool.memory().waiting === 1);
      release();
      expect([(await first).statusCode, (await second).statusCode, (await third).statusCode]).toEqual([200, 200, 200]);
      expect(counted.reads).toBe(1);
      await until(() => full.app.renderPool.memory().admittedBytes === 0);
      // Every place is back: the next request is served.
      expect((await ask(305)).statusCode).toBe(200);
    } finally {
      await full.close();
    }
  });
});

describe('the lobby: a full wait line with pool.lobby 1', () => {
  it('the next request waits unread for a place and is served; one more than the lobby holds is refused at once, unread', async () => {
    const { full, counted, ask, held: [first, second], release } = await lineOfOne(400, undefined, 1);
    try {
      const third = ask(402);
      await until(() => full.app.renderPool.memory().waiting === 1);
      expect(counted.reads).toBe(3);
      const fourth = ask(403);
      await until(() => full.app.renderPool.memory().lobby === 1);
      expect(counted.reads).toBe(3);
      expect((await full.app.inject({ url: '/metrics' })).body).toMatch(/^foldwise_pool_lobby 1$/m);
      const fifth = await ask(404);
      expect([fifth.statusCode, fifth.json().code]).toEqual([503, 'ERR_OVERLOADED']);
      expect(fifth.headers['retry-after']).toBe(String(full.config.pool.retryAfterSeconds));
      expect(counted.reads).toBe(3);
      release();
      const answers = await Promise.all([first, second, third, fourth]);
      expect(answers.map((r) => r.statusCode)).toEqual([200, 200, 200, 200]);
      expect((await sharp(answers[3].rawPayload).metadata()).width).toBe(403);
      expect(counted.reads).toBe(4);
      expect(full.app.renderPool.memory()).toMatchObject({ lobby: 0, waiting: 0 });
    } finally {
      await full.close();
    }
  });
});
