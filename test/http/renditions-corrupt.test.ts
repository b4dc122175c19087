import { readdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { encodeGrating, flipMiddleThird, silentlyDamagedWebp, truncated, withFrameSize } from '../helpers/damage.js';

// Damaged sources through HTTP: a 422 ERR_SOURCE_CORRUPT problem every time, on the in-memory
// path (spooling off) and the spooled one (prefilter=none on a source over 1 MP streams), and
// through the upload hook; nothing is stored in any cache tier.

const timing = (res: { headers: Record<string, unknown> }) => String(res.headers['server-timing']);

/** Files (entries) the disk tier holds, temporary folder excluded. */
async function diskEntries(dir: string): Promise<string[]> {
  // The disk tier's entry folders (two hex digits), as DiskTier reads them; not tmp/ or .by-source/.
  const subs = (await readdir(dir).catch(() => [] as string[])).filter((s) => /^[0-9a-f]{2}$/.test(s));
  return (await Promise.all(subs.map((s) => readdir(join(dir, s))))).flat();
}

async function storedBytes(t: TestApp): Promise<number> {
  const { values } = await t.app.metrics.cacheStoredBytes.get();
  return values.reduce((sum, v) => sum + v.value, 0);
}

describe('damaged sources through HTTP', () => {
  let streamed: TestApp;
  let inMemory: TestApp;
  const files: Record<string, Buffer> = {};

  beforeAll(async () => {
    [streamed, inMemory] = await Promise.all([build(), build({ config: { pool: { spoolDir: 'off' } } })]);
    const [jpeg, webp, tiff] = await Promise.all([encodeGrating('jpeg'), encodeGrating('webp'), encodeGrating('tiff')]);
    files['flipped.jpg'] = flipMiddleThird(jpeg);
    files['flipped.webp'] = flipMiddleThird(webp);
    files['cut.jpg'] = truncated(jpeg, 0.6);
    files['liar.jpg'] = withFrameSize(jpeg, 8000, 8000);
    files['cut.tif'] = truncated(tiff, 0.6);
    files['tokens.webp'] = await silentlyDamagedWebp(); // libwebp decodes it without an error
    files['tail.webp'] = Buffer.concat([webp, Buffer.from('trailing bytes')]);
    files['good.jpg'] = jpeg;
    for (const t of [streamed, inMemory]) {
      for (const [name, bytes] of Object.entries(files)) await writeFile(join(t.sourceDir, name), bytes);
    }
  });
  afterAll(() => Promise.all([streamed.close(), inMemory.close()]));

  const damaged = ['flipped.jpg', 'flipped.webp', 'tokens.webp', 'tail.webp', 'cut.jpg', 'liar.jpg', 'cut.tif'];

  it.each(damaged)('%s: 422 ERR_SOURCE_CORRUPT, twice (not cached), with or without spooling', async (name) => {
    for (const t of [inMemory, streamed]) {
      for (let i = 0; i < 2; i++) {
        const res = await t.app.inject({ url: `/v1/renditions/${name}?width=320&format=png&prefilter=none` });
        expect(res.statusCode).toBe(422);
        expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
        expect(res.headers['cache-control']).toBe('no-store');
        expect(res.json().code).toBe('ERR_SOURCE_CORRUPT');
      }
    }
  });

  it('the spooled app streams the good file of the same size (so the damaged ones took the spooled path)', async () => {
    const res = await streamed.app.inject({ url: '/v1/renditions/good.jpg?width=320&format=png&prefilter=none' });
    expect(res.statusCode).toBe(200);
    expect(timing(res)).toMatch(/(^|, )stream;/);
  });

  it('nothing of the damaged files reached a cache tier', async () => {
    for (const t of [inMemory, streamed]) {
      for (const name of damaged) await t.app.inject({ url: `/v1/renditions/${name}?width=200&prefilter=none` });
    }
    // Renditions are answered before their disk files are written (renderRendition's answerFirst).
    for (const t of [inMemory, streamed]) await t.app.renditionCache.cache.settled();
    expect(await storedBytes(inMemory)).toBe(0);
    expect(await diskEntries(inMemory.cacheDir)).toEqual([]);
    const before = await storedBytes(streamed);
    expect(before).toBeGreaterThan(0); // good.jpg, stored once above
    expect(await diskEntries(streamed.cacheDir)).toHaveLength(1);
  });

  it.each(damaged)('%s uploaded to /v1/ingest: 422 ERR_SOURCE_CORRUPT', async (name) => {
    const type = name.endsWith('.webp') ? 'image/webp' : name.endsWith('.tif') ? 'image/tiff' : 'image/jpeg';
    const res = await inMemory.app.inject({
      method: 'POST',
      url: '/v1/ingest?widths=320',
      headers: { 'content-type': type },
      payload: files[name],
    });
    expect(res.statusCode).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.json().code).toBe('ERR_SOURCE_CORRUPT');
    expect(await storedBytes(inMemory)).toBe(0);
  });
});
