/**
 * A client that disconnects mid-render, over a real socket on 127.0.0.1. The render is shared
 * work (single-flight): it is stopped at its next stage boundary when no one waits for it any
 * more, and finishes into the cache while another caller still waits. Either way it releases
 * its memory and leaves no flight behind. Synchronised on events (the task reaching the pool,
 * the server seeing the socket close), never on sleeps.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SingleFlight } from '../../src/lib/single-flight.js';
import type { CacheEntry } from '../../src/cache/types.js';
import { build, type TestApp } from '../helpers/build.js';
import { at, pixels, writePng } from '../helpers/images.js';
import { PoolTap, until } from './pool-tap.js';

let t: TestApp;
const tap = new PoolTap();
let port = 0;
let serverClosedSockets = 0;

beforeAll(async () => {
  t = await build({ poolRunner: tap.runner });
  await writePng(t.sourceDir, 'flat.png', 48, 32, 3, () => [60, 120, 180]);
  await t.app.listen({ port: 0, host: '127.0.0.1' });
  port = (t.app.server.address() as AddressInfo).port;
  t.app.server.on('connection', (s) => s.on('close', () => serverClosedSockets++));
});
afterAll(() => t.close());

describe('a client disconnects mid-render', () => {
  function connect(url: string) {
    const req = http.request({ host: '127.0.0.1', port, path: url, agent: false });
    req.on('error', () => undefined); // the abort below surfaces here; expected
    req.end();
    return req;
  }

  it('alone, its render is aborted: nothing is cached, the memory and the flight are released', async () => {
    const held = tap.holdNext();
    const url = '/v1/renditions/flat.png?width=24&format=png';
    const req = connect(url);
    await held.reachedPool;
    const closedBefore = serverClosedSockets;
    req.destroy();
    await until(() => serverClosedSockets > closedBefore);
    held.release();
    const flight = t.app.renditionCache.flight as SingleFlight<CacheEntry>;
    await until(() => t.app.renderPool.memory().admittedBytes === 0 && flight.size === 0);
    expect(t.app.renderPool.inFlight).toBe(0);

    const again = await t.app.inject({ url });
    expect(again.statusCode).toBe(200);
    // Aborted, so rendered anew: the first render was not finished into the cache.
    expect(again.headers['server-timing']).toMatch(/miss/);
    expect(at(await pixels(again.rawPayload), 2, 2)).toEqual([60, 120, 180]);
  });

  it('while another caller waits, the render completes into the cache for it', async () => {
    const held = tap.holdNext();
    const url = '/v1/renditions/flat.png?width=20&format=png';
    const flight = t.app.renditionCache.flight as SingleFlight<CacheEntry>;
    const leaving = connect(url);
    await held.reachedPool;
    const joined = new Promise<void>((r) => t.app.renditionCache.events.once('join', () => r()));
    const staying = t.app.inject({ url });
    await joined;
    const closedBefore = serverClosedSockets;
    leaving.destroy();
    await until(() => serverClosedSockets > closedBefore);
    held.release();
    const res = await staying;
    expect(res.statusCode).toBe(200);
    expect(at(await pixels(res.rawPayload), 2, 2)).toEqual([60, 120, 180]);
    await until(() => t.app.renderPool.memory().admittedBytes === 0 && flight.size === 0);
    const again = await t.app.inject({ url });
    expect(again.headers['server-timing']).toMatch(/hit/);
  });

  it('keeps serving other clients afterwards', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/flat.png?width=12&format=png' });
    expect(res.statusCode).toBe(200);
    expect(res.headers['server-timing']).toMatch(/miss/);
  });
});
