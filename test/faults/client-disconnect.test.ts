/**
 * A client that disconnects mid-render, over a real socket on 127.0.0.1. The render is
 * shared work (single-flight; other callers may be waiting on it), so it is not cancelled:
 * it must finish into the cache, release its render slot and leave no flight behind.
 * Synchronised on events (the task reaching the pool, the server seeing the socket close),
 * never on sleeps.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SingleFlight } from '../../src/cache/single-flight.js';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, writePng } from '../helpers/images.js';
import { tapNextRun, until } from './pool-tap.js';

let t: TestApp;
let port = 0;
let serverClosedSockets = 0;

beforeAll(async () => {
  t = await build();
  await writePng(t.sourceDir, 'flat.png', 48, 32, 3, () => [60, 120, 180]);
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
  t.app.server.on('connection', (s) => s.on('close', () => serverClosedSockets++));
});
afterAll(() => t.close());

describe('a client disconnects mid-render', () => {
  it('the render completes into the cache; no slot or flight is leaked', async () => {
    let started!: () => void;
    const reachedPool = new Promise<void>((r) => (started = r));
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    // Hold the resample task at the pool's door until the client has gone.
    tapNextRun(t.app.renderPool, async (original, task, options) => {
      started();
      await gate;
      return original(task, options);
    });

    const url = '/v1/renditions/flat.png?width=24&format=png';
    const req = http.request({ host: '127.0.0.1', port, path: url, agent: false });
    req.on('error', () => undefined); // the abort below surfaces here; expected
    req.end();
    await reachedPool;
    const closedBefore = serverClosedSockets;
    req.destroy();
    await until(() => serverClosedSockets > closedBefore);
    expect(t.app.renderPool.inFlight).toBe(1);

    release();
    const flight = t.app.renditionCache.flight as SingleFlight;
    await until(() => t.app.renderPool.inFlight === 0 && flight.size === 0);

    const again = await t.app.inject({ url });
    expect(again.statusCode).toBe(200);
    expect(again.headers['server-timing']).toMatch(/hit/);
    expect(at(await pixels(again.rawPayload), 2, 2)).toEqual([60, 120, 180]);
  });

  it('keeps serving other clients afterwards', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/flat.png?width=12&format=png' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['server-timing']).toMatch(/miss/);
  });
});
