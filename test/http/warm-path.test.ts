import { readdir } from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { warmRenderPath } from '../../src/http/warm-path.js';
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
