import Fastify from 'fastify';
import { describe, expect, it, vi } from 'vitest';
import errorsPlugin from '../../../src/http/plugins/errors.js';
import pressurePlugin, { type PressureOptions } from '../../../src/http/plugins/pressure.js';

async function appWith(limits: Partial<PressureOptions>) {
  const app = Fastify({ logger: false });
  await app.register(errorsPlugin);
  await app.register(pressurePlugin, {
    maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0, sampleIntervalMs: 10, retryAfterSeconds: 3,
    ...limits,
  });
  app.get('/v1/work', async () => ({ ok: true }));
  app.get('/healthz', async () => ({ status: 'ok' }));
  await app.ready();
  return app;
}

describe('pressure plugin (load shedding)', () => {
  it('never sheds on RSS alone: memory is bounded by admission, and RSS that does not come back must not lock the replica out', async () => {
    // A one-byte RSS limit and a one-byte heap limit on two apps: only the heap one sheds.
    const rss = await appWith({ maxRssBytes: 1, maxHeapUsedBytes: 0 });
    const heap = await appWith({ maxHeapUsedBytes: 1 });
    await vi.waitFor(() => expect(heap.isUnderPressure()).toBe(true)); // a sample was taken
    expect(rss.isUnderPressure()).toBe(false);
    const served = await rss.inject('/v1/work');
    expect(served.statusCode).toBe(200);
    const res = await heap.inject('/v1/work');
    expect(res.statusCode).toBe(503);
    expect(res.headers['retry-after']).toBe('3');
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    const body = res.json();
    expect(body).toMatchObject({ status: 503, code: 'ERR_OVERLOADED' });
    expect(body.detail).toMatch(/heap/);
    expect(body.stack).toBeUndefined();
    await rss.close();
    await heap.close();
  });

  it('keeps liveness answering while shedding', async () => {
    const app = await appWith({ maxHeapUsedBytes: 1 });
    await vi.waitFor(() => expect(app.isUnderPressure()).toBe(true));
    expect((await app.inject('/healthz')).statusCode).toBe(200);
    expect((await app.inject('/v1/work')).json().detail).toMatch(/heap/);
    await app.close();
  });

  it('passes requests through below the limits', async () => {
    const app = await appWith({ maxRssBytes: 2 ** 50, maxHeapUsedBytes: 2 ** 50, maxEventLoopDelayMs: 60_000 });
    expect((await app.inject('/v1/work')).statusCode).toBe(200);
    expect(app.pressureLimits.retryAfterSeconds).toBe(3);
    await app.close();
  });
});
