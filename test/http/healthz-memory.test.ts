import { afterEach, describe, expect, it, vi } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';

// /healthz is the orchestrator's restart signal: it must fail when resident memory stays above
// its ceiling with nothing admitted (seen: RSS stuck at 2.4 GB, every request refused for over
// ten minutes, while /healthz stayed 200 so nothing restarted the replica).
describe('/healthz when memory cannot come back', () => {
  let t: TestApp | undefined;
  afterEach(async () => {
    await t?.close();
    t = undefined;
  });

  it('fails with 503 ERR_MEMORY_STUCK once RSS stays above the ceiling with no job admitted', async () => {
    // A 1 MiB ceiling: any Node process is above it, and this app is idle.
    t = await build({ config: { pressure: { maxRssBytes: 2 ** 20, stuckAfterMs: 50, sampleIntervalMs: 10 } } });
    const app = t.app;
    await vi.waitFor(async () => expect((await app.inject('/healthz')).statusCode).toBe(503), { timeout: 10_000, interval: 20 });
    const res = await app.inject('/healthz');
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    const body = res.json();
    expect(body).toMatchObject({ status: 503, code: 'ERR_MEMORY_STUCK' });
    expect(body.detail).toMatch(/resident memory \d+ MiB has stayed above 1 MiB for \d+ s with no job admitted/);
    // Readiness is a different question: the replica can still serve what it has.
    expect((await app.inject('/readyz')).statusCode).toBe(200);
  });

  it('stays 200 with the ceiling set to 0 (the watch off)', async () => {
    t = await build({ config: { pressure: { maxRssBytes: 0, stuckAfterMs: 50, sampleIntervalMs: 10 } } });
    expect(t.app.memoryStuck()).toBeNull();
    const res = await t.app.inject('/healthz');
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual({ status: 'ok' });
  });
});
