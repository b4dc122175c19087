/**
 * DELETE /v1/sources/{path} on one replica (memory and disk tiers): refused unless signing is
 * on and the URL signed; removes the source, every rendition on every tier, the identity memo,
 * the kept bytes, the spectrum and the manifests, so that nothing of it is served afterwards.
 */
import { readdir } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signUrl } from '../../src/security/signing.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

const key = 'a signing key for the weaving shop';
const checks = (x: number, y: number) => ((x >> 3) + (y >> 3)) % 2 ? [200, 40, 40] : [240, 230, 210];

/** Every entry file of the disk tier (its own folders and the index excluded). */
async function diskEntries(dir: string): Promise<string[]> {
  const all = await readdir(dir, { recursive: true, withFileTypes: true }).catch(() => []);
  return all
    .filter((e) => e.isFile())
    .map((e) => relative(dir, join(e.parentPath, e.name)))
    .filter((p) => /^[0-9a-f]{2}\//.test(p));
}

it('is refused with 403 when signing is off', async () => {
  const t = await build();
  try {
    await writePng(t.sourceDir, 'herringbone.png', 64, 48, 3, checks);
    const res = await t.app.inject({ method: 'DELETE', url: '/v1/sources/herringbone.png' });
    expect(res.statusCode).toBe(403);
    expect(res.json().code).toBe('ERR_SIGNATURE_REQUIRED');
    expect((await t.app.inject('/v1/renditions/herringbone.png?width=32')).statusCode).toBe(200);
  } finally {
    await t.close();
  }
});

describe('with signing on', () => {
  let t: TestApp;
  beforeAll(async () => {
    // Renditions may be fetched unsigned here; deletion still needs its own signed URL.
    t = await build({ config: { signing: { keys: [key], required: false }, cache: { sourceBytes: 16 * 2 ** 20 } } });
    await writePng(t.sourceDir, 'label.png', 96, 64, 3, checks);
    await writePng(t.sourceDir, 'brick.png', 96, 64, 3, checks);
  });
  afterAll(() => t.close());

  it('refuses unsigned and wrongly signed deletions, keeping everything', async () => {
    const unsigned = await t.app.inject({ method: 'DELETE', url: '/v1/sources/label.png' });
    expect(unsigned.statusCode).toBe(403);
    expect(unsigned.json().code).toBe('ERR_SIGNATURE_REQUIRED');
    // A signature of another path (a rendition URL of the same source) does not carry over.
    const other = signUrl('/v1/sources/brick.png', {}, key).split('?')[1];
    const wrong = await t.app.inject({ method: 'DELETE', url: `/v1/sources/label.png?${other}` });
    expect(wrong.statusCode).toBe(403);
    expect(wrong.json().code).toBe('ERR_SIGNATURE_INVALID');
    expect((await t.app.inject('/v1/renditions/label.png?width=40')).statusCode).toBe(200);
  });

  it('removes the source and every rendition from memory and disk; nothing is served after', async () => {
    const urls = ['/v1/renditions/brick.png?width=48&format=png', '/v1/renditions/brick.png?width=24&format=webp'];
    for (const u of urls) expect((await t.app.inject(u)).statusCode).toBe(200);
    const risk = await t.app.inject('/v1/alias-risk/brick.png?width=24');
    expect(risk.statusCode).toBe(200);
    // Renditions are answered before their disk files are written (renderRendition's answerFirst).
    await t.app.renditionCache.cache.settled();
    const keep = await diskEntries(t.cacheDir);
    expect(keep.length).toBeGreaterThanOrEqual(2);
    // The source's bytes are kept for its next rendition (cache.sourceBytes)...
    const identity = await t.app.origin.identify('brick.png');
    expect(t.app.renderContext.sources?.get(identity)?.bytes.length).toBeGreaterThan(0);
    const res = await t.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/brick.png', {}, key) });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toMatchObject({ source: 'brick.png', removed: true, replicas: 0 });
    expect(res.json().entries).toBeGreaterThanOrEqual(2);
    expect(res.headers['cache-control']).toBe('no-store');
    expect(await readdir(t.sourceDir)).not.toContain('brick.png');
    // ...and let go with it.
    expect(t.app.renderContext.sources?.get(identity)).toBeUndefined();
    // The other source's entries stay; none of brick.png's do.
    expect((await diskEntries(t.cacheDir)).length).toBe(keep.length - res.json().entries);
    for (const u of urls) {
      const after = await t.app.inject(u);
      expect(after.statusCode).toBe(404);
      expect(after.json().code).toBe('ERR_SOURCE_NOT_FOUND');
    }
    expect((await t.app.inject('/v1/alias-risk/brick.png?width=24')).statusCode).toBe(404);
    const again = await t.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/brick.png', {}, key) });
    expect(again.statusCode).toBe(404);
  });

  it('forgets the manifest of a deleted upload, so the same bytes are stored and rendered again', async () => {
    const { readFile } = await import('node:fs/promises');
    const bytes = await readFile(join(t.sourceDir, 'label.png'));
    const { createHash } = await import('node:crypto');
    const digest = createHash('sha256').update(bytes).digest('hex');
    const post = () =>
      t.app.inject({ method: 'POST', url: signUrl('/v1/ingest', { widths: '32', digest }, key), headers: { 'content-type': 'image/png' }, payload: bytes });
    const first = await post();
    expect(first.statusCode).toBe(200);
    const source = first.json().source.key;
    const del = await t.app.inject({ method: 'DELETE', url: signUrl(`/v1/sources/${source}`, {}, key) });
    expect(del.statusCode).toBe(200);
    expect((await t.app.inject(first.json().renditions[0].url)).statusCode).toBe(404);
    const second = await post();
    expect(second.statusCode).toBe(200);
    expect((await readdir(join(t.sourceDir, 'uploads'))).map((f) => `uploads/${f}`)).toContain(source);
    expect((await t.app.inject(second.json().renditions[0].url)).statusCode).toBe(200);
  });

  it('refuses a path that leaves the source folder', async () => {
    const res = await t.app.inject({ method: 'DELETE', url: signUrl('/v1/sources/../secret.png', {}, key) });
    expect(res.statusCode).toBeGreaterThanOrEqual(400);
    expect(res.statusCode).toBeLessThan(500);
  });
});
