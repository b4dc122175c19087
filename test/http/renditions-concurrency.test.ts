import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createFolderOrigin } from '../../src/origins/folder.js';
import { build, type TestApp } from '../helpers/build.js';
import { eventCount, gatedOrigin } from '../helpers/gated-origin.js';
import { writePng } from '../helpers/images.js';

describe('GET /v1/renditions under concurrency', () => {
  let dir: string;
  let t: TestApp;
  let gated: ReturnType<typeof gatedOrigin>;

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-conc-'));
    await writePng(dir, 'one.png', 32, 32, 3, (x, y) => [x * 8, y * 8, 0]);
    await writeFile(join(dir, 'bad.png'), 'this is not a PNG');
    gated = gatedOrigin(createFolderOrigin(dir));
    t = await build({ sourceDir: dir, origin: gated.origin, config: { pool: { threads: 1, maxQueue: 0 } } });
  });
  beforeEach(() => gated.reset());
  afterAll(async () => {
    gated.release();
    await t.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('N concurrent identical misses render once (single-flight)', async () => {
    const N = 8;
    const url = '/v1/renditions/one.png?width=16&format=png';
    const joined = eventCount(t.app.renditionCache.events, 'join', N - 1);
    const started = eventCount(gated.events, 'read', 1);
    const responses = Promise.all(Array.from({ length: N }, () => t.app.inject({ url })));
    await started; // the leader is reading the source...
    await joined; // ...and the other N-1 requests are waiting on its flight
    gated.release();
    const all = await responses;
    expect(gated.state.reads).toBe(1);
    expect(all.map((r) => r.statusCode)).toEqual(Array(N).fill(200));
    expect(new Set(all.map((r) => r.headers.etag)).size).toBe(1);
    // Nobody was answered from the cache: they shared the one render.
    for (const r of all) expect(r.headers['server-timing']).toMatch(/cache;desc="miss"/);
  });

  it('an origin read in progress holds no memory budget (the read comes before admission)', async () => {
    // The bounded wait's 503 and the budget's 413 are tested in renditions-memory.test.ts.
    const started = eventCount(gated.events, 'read', 1);
    const first = t.app.inject({ url: '/v1/renditions/one.png?width=10&format=png' });
    await started;
    expect(t.app.renderPool.memory()).toMatchObject({ admittedBytes: 0, running: 0, waiting: 0 });
    gated.release();
    expect((await first).statusCode).toBe(200);
  });

  it('requests that join a failing render share its error, and the failure is not remembered', async () => {
    const url = '/v1/renditions/bad.png?width=8';
    const joined = eventCount(t.app.renditionCache.events, 'join', 2);
    const started = eventCount(gated.events, 'read', 1);
    const responses = Promise.all([0, 1, 2].map(() => t.app.inject({ url })));
    await started;
    await joined;
    gated.release();
    const all = await responses;
    expect(gated.state.reads).toBe(1);
    const codes = all.map((r) => r.json().code);
    expect(new Set(codes).size).toBe(1);
    expect(codes[0]).toMatch(/^ERR_SOURCE_(CORRUPT|UNSUPPORTED)$/);
    await t.app.inject({ url });
    expect(gated.state.reads).toBe(2); // tried again, not answered from a remembered failure
  });
});
