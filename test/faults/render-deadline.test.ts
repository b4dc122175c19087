/**
 * Renders cut short from outside are refusals a client may retry, not failures: the render
 * deadline aborting a real piscina task gives 503 ERR_RENDER_TIMEOUT, the pool closing under
 * a render 503 ERR_SERVICE_STOPPING, both with Retry-After and problem+json, nothing cached,
 * no render slot left behind. (A worker that crashes by itself stays a 500: worker-crash.test.ts.)
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createFolderOrigin } from '../../src/origins/folder.js';
import { build, type TestApp } from '../helpers/build.js';
import { eventCount, gatedOrigin } from '../helpers/gated-origin.js';
import { at, pixels, writePng } from '../helpers/images.js';
import { memoryEntries } from '../security/cache-probe.js';
import { PoolTap, until } from './pool-tap.js';

const hangModule = fileURLToPath(new URL('./hang-worker.ts', import.meta.url));
const retryAfterSeconds = 3;

type Response = Awaited<ReturnType<TestApp['app']['inject']>>;

function expectRetryableRefusal(res: Response, code: string): void {
  expect(res.statusCode).toBe(503);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.headers['retry-after']).toBe(String(retryAfterSeconds));
  expect(res.headers['cache-control']).toBe('no-store');
  expect(res.json()).toMatchObject({ status: 503, code });
}

describe('the render deadline aborts a real pool task', () => {
  let t: TestApp;
  const tap = new PoolTap();
  beforeAll(async () => {
    // Long enough for the tiny recovery render on a busy machine; the held task waits it out.
    t = await build({ poolRunner: tap.runner, config: { limits: { renderTimeoutMs: 1000 }, pool: { retryAfterSeconds } } });
    await writePng(t.sourceDir, 'flat.png', 48, 32, 3, () => [90, 140, 200]);
  });
  afterAll(() => t.close());

  it('503 ERR_RENDER_TIMEOUT with Retry-After; the pool replaces the thread and renders again', async () => {
    let ran = false;
    // The real task is swapped for one that never ends; only the deadline's abort, through
    // piscina (which terminates the thread), can settle it.
    tap.nextRun((original, task, options) => {
      ran = true;
      return original(task, { ...options, filename: hangModule });
    });
    const before = memoryEntries(t.app);
    // The aborted task's thread is terminated; its replacement reports ready when it has started.
    const replaced = tap.nextWorkerReady();
    const res = await t.app.inject({ url: '/v1/renditions/flat.png?width=24&format=png' });
    expect(ran).toBe(true);
    expectRetryableRefusal(res, 'ERR_RENDER_TIMEOUT');
    expect(memoryEntries(t.app)).toBe(before);
    await until(() => t.app.renderPool.inFlight === 0);
    await replaced;

    const again = await t.app.inject({ url: '/v1/renditions/flat.png?width=24&format=png' });
    expect(again.statusCode).toBe(200);
    // A flat field stays flat under any normalised resampler (CHECKS.md invariant).
    expect(at(await pixels(again.rawPayload), 3, 3)).toEqual([90, 140, 200]);
  });
});

describe('the pool closes under a render (shutdown)', () => {
  let dir: string;
  let t: TestApp;
  let gated: ReturnType<typeof gatedOrigin>;

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-stop-'));
    await writePng(dir, 'flat.png', 48, 32, 3, () => [90, 140, 200]);
    gated = gatedOrigin(createFolderOrigin(dir));
    t = await build({ sourceDir: dir, origin: gated.origin, config: { pool: { retryAfterSeconds } } });
  });
  afterAll(async () => {
    gated.release();
    await t.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('a render admitted before the close gets 503 ERR_SERVICE_STOPPING, and so does a new one', async () => {
    const reading = eventCount(gated.events, 'read', 1);
    const pending = t.app.inject({ url: '/v1/renditions/flat.png?width=20&format=png' });
    await reading; // admitted, holding its slot, waiting for the source
    await t.app.renderPool.close();
    gated.release();
    expectRetryableRefusal(await pending, 'ERR_SERVICE_STOPPING');
    expect(memoryEntries(t.app)).toBe(0);
    expect(t.app.renderPool.inFlight).toBe(0);
    expectRetryableRefusal(await t.app.inject({ url: '/v1/renditions/flat.png?width=21&format=png' }), 'ERR_SERVICE_STOPPING');
  });
});

describe('piscina refuses a task because it is closing', () => {
  let t: TestApp;
  const tap = new PoolTap();
  beforeAll(async () => {
    t = await build({ poolRunner: tap.runner, config: { pool: { retryAfterSeconds } } });
    await writePng(t.sourceDir, 'flat.png', 48, 32, 3, () => [90, 140, 200]);
  });
  afterAll(() => t.close());

  it('its abort is answered 503 ERR_SERVICE_STOPPING, not 500 ERR_RENDER_FAILED', async () => {
    // The close starts between our check and piscina's run, as when shutdown races a render.
    tap.nextRun((original, task, options) => {
      void t.app.renderPool.close();
      return original(task, options);
    });
    expectRetryableRefusal(await t.app.inject({ url: '/v1/renditions/flat.png?width=22&format=png' }), 'ERR_SERVICE_STOPPING');
    expect(memoryEntries(t.app)).toBe(0);
  });
});
