/**
 * A render worker that dies mid-task: the request gets a clean 500 problem+json
 * (ERR_RENDER_FAILED, no stack), nothing is cached, no render slot leaks, and the pool
 * replaces the thread so the next request renders correctly.
 */
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ResampleTask } from '../../src/pool/worker.js';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, writePng } from '../helpers/images.js';
import { memoryEntries } from '../security/cache-probe.js';
import { PoolTap, until } from './pool-tap.js';

const crashModule = fileURLToPath(new URL('./crash-worker.ts', import.meta.url));
const hangModule = fileURLToPath(new URL('./hang-worker.ts', import.meta.url));
let t: TestApp;
const tap = new PoolTap();

const entries = () => memoryEntries(t.app);

async function expectCleanFailure(url: string): Promise<void> {
  const before = entries();
  const res = await t.app.inject({ url });
  expect(res.statusCode).toBe(500);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.json()).toMatchObject({ status: 500, code: 'ERR_RENDER_FAILED' });
  expect(res.body).not.toMatch(/\n\s+at |injected|process\.exit/);
  expect(entries()).toBe(before);
  await until(() => t.app.renderPool.inFlight === 0);
}

async function expectRecovered(width: number): Promise<void> {
  const res = await t.app.inject({ url: `/v1/renditions/flat.png?width=${width}&format=png` });
  expect(res.statusCode).toBe(200);
  const img = await pixels(res.rawPayload);
  // A flat field stays flat under any normalised resampler (CHECKS.md invariant).
  expect(at(img, 1, 1)).toEqual([90, 140, 200]);
  expect(tap.workers().length).toBeGreaterThanOrEqual(1);
}

beforeAll(async () => {
  t = await build({ poolRunner: tap.runner });
  await writePng(t.sourceDir, 'flat.png', 48, 32, 3, () => [90, 140, 200]);
});
afterAll(() => t.close());

describe('a render worker crashes', () => {
  it('killed from outside while running a task (as by a fatal native error)', async () => {
    // The task never finishes by itself (a fast machine could finish a real one before the
    // kill lands): only the thread's death ends it.
    tap.nextRun((original, task, options) => {
      const running = original(task, { ...options, filename: hangModule });
      for (const w of tap.workers()) void w.terminate();
      return running;
    });
    await expectCleanFailure('/v1/renditions/flat.png?width=24&format=png');
    await expectRecovered(24);
  });

  it('exits from inside the thread (process.exit in a worker)', async () => {
    tap.nextRun((original, task, options) => original({ ...task, mode: 'exit' } as ResampleTask, { ...options, filename: crashModule }));
    await expectCleanFailure('/v1/renditions/flat.png?width=20&format=png');
    await expectRecovered(20);
  });

  it('throws an uncaught exception outside the task', async () => {
    tap.nextRun((original, task, options) =>
      original({ ...task, mode: 'throw-later' } as ResampleTask, { ...options, filename: crashModule }),
    );
    await expectCleanFailure('/v1/renditions/flat.png?width=16&format=png');
    await expectRecovered(16);
  });

  it('the process is still healthy', async () => {
    expect((await t.app.inject({ url: '/healthz' })).statusCode).toBe(200);
  });
});
