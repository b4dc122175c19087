/**
 * Readiness waits for the purge subscription (issue 13): a replica that is not subscribed to
 * the purge channel would miss a deletion made on another replica and go on serving what it
 * removed. Its Redis connections go through a relay that can hold the subscriber's connection
 * (ioredis names it first thing, CLIENT SETNAME foldwise-sub) while the others pass, so the
 * test sees "Redis up, not subscribed" at start and after a dropped connection. The test
 * waits on the relay's and the bus's events, never on time.
 */
import { once } from 'node:events';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { next, redisBinary, startRedis, type RedisProcess } from '../helpers/redis-server.js';
import { TcpGate } from '../helpers/tcp-gate.js';

const subscriber = /foldwise-sub/;

describe.skipIf(!redisBinary)('/readyz and the purge subscription', () => {
  let server: RedisProcess;
  let gate: TcpGate;
  let t: TestApp;

  beforeAll(async () => {
    server = await startRedis();
    gate = await TcpGate.start(server.port);
    gate.holdMatching(subscriber);
    const held = once(gate, 'held');
    t = await build({
      // Commands wait long enough that a held connection is not given up while the test looks.
      config: { cache: { redisUrl: gate.url }, redis: { namespace: 'ready-purge:', commandTimeoutMs: 10_000, connectTimeoutMs: 10_000 } },
    });
    await held;
    await t.app.sharedRedis!.tier.link.ready();
  });
  afterAll(async () => {
    gate?.release();
    await t?.close();
    await gate?.close();
    await server?.stop();
  });

  it('is 503 until subscribed at start, ready once subscribed, 503 again while Redis is up but the subscription is lost', async () => {
    // Start: Redis is up (the main connection passed), the subscriber's connection is held.
    expect(t.app.sharedRedis!.health().status).toBe('up');
    const before = await t.app.inject('/readyz');
    expect(before.statusCode).toBe(503);
    expect(before.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(before.json()).toMatchObject({ status: 503, code: 'ERR_NOT_READY', detail: 'purge: subscribing to deletions' });

    const subscribed = t.app.purgeBus!.whenSubscribed();
    gate.release();
    await subscribed;
    const after = await t.app.inject('/readyz');
    expect(after.statusCode).toBe(200);
    expect(after.json()).toMatchObject({
      status: 'ready',
      checks: { purge: { ok: true, detail: 'subscribed to deletions' }, redis: { ok: true, detail: 'connection up, circuit closed' } },
    });

    // The connections drop; the main one comes back, the subscriber's is held again.
    gate.holdMatching(subscriber);
    const lost = once(t.app.purgeBus!, 'lost');
    const held = once(gate, 'held');
    const mainBack = next(t.app.sharedRedis!.tier.link.client, 'ready');
    gate.cut();
    await Promise.all([lost, held, mainBack]);
    const cutOff = await t.app.inject('/readyz');
    expect(cutOff.statusCode).toBe(503);
    expect(cutOff.json()).toMatchObject({ code: 'ERR_NOT_READY', detail: 'purge: not subscribed to deletions' });

    const again = t.app.purgeBus!.whenSubscribed();
    gate.release();
    await again;
    const back = await t.app.inject('/readyz');
    expect(back.statusCode).toBe(200);
    expect(back.json().checks.purge).toEqual({ ok: true, detail: 'subscribed to deletions' });
  });

  it('while Redis itself is down it is degraded (200), not out: every replica would be out at once', async () => {
    await t.app.purgeBus!.whenSubscribed();
    const lost = once(t.app.purgeBus!, 'lost');
    const down = next(t.app.sharedRedis!.tier.link.client, 'close');
    await server.kill();
    await Promise.all([lost, down]);
    const res = await t.app.inject('/readyz');
    expect(res.statusCode).toBe(200);
    expect(res.json()).toMatchObject({ status: 'degraded', checks: { purge: { ok: false, detail: 'not subscribed to deletions' }, redis: { ok: false } } });
    const subscribed = t.app.purgeBus!.whenSubscribed();
    await server.restart();
    await subscribed;
    expect((await t.app.inject('/readyz')).json().checks.purge).toEqual({ ok: true, detail: 'subscribed to deletions' });
  });
});
