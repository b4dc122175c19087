import { readdir } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WARM_UP_SOURCE, warmRenderPath } from '../../src/http/warm-path.js';
import { isWarmUp, warmUpHeaders } from '../../src/http/warm-up-token.js';
import { build, type TestApp } from '../helpers/build.js';

/** Every file under a folder, relative paths. */
async function files(dir: string): Promise<string[]> {
  return (await readdir(dir, { recursive: true, withFileTypes: true })).filter((e) => e.isFile()).map((e) => e.name);
}

describe('warmRenderPath: the main thread renders once through the real path before the service says ready', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
  });
  afterAll(() => t.close());

  it('renders a new streamed source and a further width, and leaves no trace in the cache, spectra, metrics or folders', async () => {
    const stages = async () => (await t.app.metrics.stageSeconds.get()).values.filter((v) => v.metricName?.endsWith('_count')).reduce((n, v) => n + v.value, 0);
    const before = { stages: await stages(), cache: await files(t.cacheDir) };
    const spool = t.app.renderPool.spool!.dir;
    expect(await warmRenderPath(t.app)).toBe(true);
    // Its own pool work went through the spool folder and left nothing there.
    expect(await readdir(spool)).toEqual([]);
    expect(t.app.spectra.analyses).toBe(0);
    expect(await stages()).toBe(before.stages);
    expect(await files(t.cacheDir)).toEqual(before.cache);
    expect(await files(t.sourceDir)).toEqual([]);
    expect(t.app.renderPool.memory().admittedBytes).toBe(0);
  });

  it('asks the rendition route itself twice (a source no folder holds), and the metrics leave those requests out', async () => {
    const requests = async () => (await t.app.metrics.httpRequests.get()).values.reduce((n, v) => n + v.value, 0);
    const asked: string[] = [];
    const origin = t.app.origin;
    const identify = origin.identify.bind(origin);
    origin.identify = (path, signal) => (asked.push(path), identify(path, signal));
    try {
      const before = await requests();
      expect(await warmRenderPath(t.app)).toBe(true);
      expect(asked).toEqual([WARM_UP_SOURCE, WARM_UP_SOURCE]);
      expect(await requests()).toBe(before);
      // The header counts only with this process's token: a client sending it is counted as any other.
      const [[name, token]] = Object.entries(warmUpHeaders());
      const forged = await t.app.inject({ url: `/v1/renditions/${WARM_UP_SOURCE}?width=400`, headers: { [name]: 'guess' } });
      expect(forged.statusCode).toBe(404);
      expect(await requests()).toBe(before + 1);
      expect(token).toMatch(/^[0-9a-f-]{36}$/);
      expect([isWarmUp({ [name]: token }), isWarmUp({ [name]: 'guess' }), isWarmUp({})]).toEqual([true, false, false]);
    } finally {
      origin.identify = identify;
    }
  });

  it('/readyz says 503 while held warm-up work runs (the server holds its render through the path), 200 once it has ended', async () => {
    let finish!: () => void;
    t.app.warmUp.hold(new Promise<void>((r) => (finish = r)));
    const during = await t.app.inject({ url: '/readyz' });
    expect(during.statusCode).toBe(503);
    expect(during.json().detail).toContain('rendering a warm-up picture');
    finish();
    await new Promise((r) => setImmediate(r));
    expect(t.app.warmUp.pending).toBe(false);
    expect((await t.app.inject({ url: '/readyz' })).statusCode).toBe(200);
  });

  it('a failure is logged and answered false, never thrown (the service starts anyway)', async () => {
    const closed = await build();
    await closed.app.renderPool.close();
    expect(await warmRenderPath(closed.app)).toBe(false);
    await closed.close();
  });
});
