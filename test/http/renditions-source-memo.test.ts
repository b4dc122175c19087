import { mkdtemp, rm, stat, utimes } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createFolderOrigin } from '../../src/origins/folder.js';
import { build, type TestApp } from '../helpers/build.js';
import { gatedOrigin } from '../helpers/gated-origin.js';
import { pixels, writePng } from '../helpers/images.js';

const cacheOf = (res: { headers: Record<string, unknown> }) => /cache;desc="([^"]+)"/.exec(String(res.headers['server-timing']))?.[1];

async function serviceWith(sourceBytes: number) {
  const dir = await mkdtemp(join(tmpdir(), 'fw-memo-'));
  await writePng(dir, 'twill.png', 64, 48, 3, () => [200, 40, 40]);
  const gated = gatedOrigin(createFolderOrigin(dir));
  gated.release();
  const t = await build({ sourceDir: dir, origin: gated.origin, config: { cache: { sourceBytes } } });
  return { dir, gated, t };
}

describe('the source memo: further renditions of a picture skip the origin read', () => {
  let s: Awaited<ReturnType<typeof serviceWith>>;
  beforeAll(async () => {
    s = await serviceWith(16 * 2 ** 20);
  });
  beforeEach(() => {
    s.gated.reset();
    s.gated.release();
  });
  afterAll(async () => {
    await s.t.close();
    await rm(s.dir, { recursive: true, force: true });
  });

  it('three new widths and the alias-risk report of one picture read it once', async () => {
    for (const width of [16, 24, 32]) {
      const res = await s.t.app.inject({ url: `/v1/renditions/twill.png?width=${width}&format=png` });
      expect(res.statusCode).toBe(200);
      expect(cacheOf(res)).toBe('miss');
      expect((await pixels(res.rawPayload)).width).toBe(width);
    }
    const risk = await s.t.app.inject({ url: '/v1/alias-risk/twill.png?width=20' });
    expect(risk.statusCode).toBe(200);
    expect(s.gated.state.reads).toBe(1);
    // The PNG's bytes, as /metrics reports them.
    const { size } = await stat(join(s.dir, 'twill.png'));
    expect((await s.t.app.inject({ url: '/metrics' })).body).toMatch(new RegExp(`^foldwise_source_bytes_kept ${size}$`, 'm'));
  });

  it('a source replaced on disk is read again, and its renditions show the new bytes', async () => {
    expect((await s.t.app.inject({ url: '/v1/renditions/twill.png?width=12&format=png' })).statusCode).toBe(200);
    s.gated.reset();
    s.gated.release();
    await writePng(s.dir, 'twill.png', 64, 48, 3, () => [40, 40, 200]);
    // A new mtime, whatever the clock's resolution: the identity (size + mtime) changes.
    await utimes(join(s.dir, 'twill.png'), new Date(), new Date(Date.now() + 5000));
    const res = await s.t.app.inject({ url: '/v1/renditions/twill.png?width=10&format=png' });
    expect(res.statusCode).toBe(200);
    const { data } = await pixels(res.rawPayload);
    expect([data[0], data[1], data[2]]).toEqual([40, 40, 200]);
    expect(s.gated.state.reads).toBe(1);
  });
});

describe('with cache.sourceBytes 0 every miss reads its source', () => {
  it('two widths, two reads', async () => {
    const s = await serviceWith(0);
    try {
      for (const width of [16, 24]) expect((await s.t.app.inject({ url: `/v1/renditions/twill.png?width=${width}&format=png` })).statusCode).toBe(200);
      expect(s.gated.state.reads).toBe(2);
    } finally {
      await s.t.close();
      await rm(s.dir, { recursive: true, force: true });
    }
  });
});
