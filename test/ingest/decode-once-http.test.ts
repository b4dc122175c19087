import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { gratingCode, png, upload } from './fixtures.js';

/** Observations of one render stage in the app's metrics (0 when it never ran). */
async function stageCount(t: TestApp, stage: string): Promise<number> {
  const text = (await t.app.inject({ url: '/metrics' })).body;
  const m = new RegExp(`foldwise_render_stage_seconds_count\\{stage="${stage}"\\} (\\d+)`).exec(text);
  return m ? Number(m[1]) : 0;
}

describe('POST /v1/ingest decodes the upload once and renders the whole ladder from it', () => {
  let t: TestApp;
  let manifest: { source: { key: string }; renditions: Array<{ url: string; etag: string }> };

  beforeAll(async () => {
    t = await build();
    const res = await upload(t.app, await png(320, 200, gratingCode(0.21)), '?widths=80,160');
    expect(res.statusCode).toBe(200);
    manifest = res.json();
  });
  afterAll(() => t.close());

  it('resamples every rendition without decoding the source again', async () => {
    expect(manifest.renditions).toHaveLength(4); // 2 widths x the default formats webp, jpeg
    // Four renditions and the 32 px placeholder, all from the one decode, which also checks
    // the bytes before they are stored.
    expect(await stageCount(t, 'resample')).toBe(5);
    expect(await stageCount(t, 'decode')).toBe(1);
    expect(await stageCount(t, 'stream')).toBe(0);
  });

  it('gives the same bytes as a rendition request that reads and decodes the source itself', async () => {
    // A second app on the same source folder with an empty cache renders each URL afresh.
    const fresh = await build({ sourceDir: t.sourceDir });
    try {
      for (const r of manifest.renditions) {
        const res = await fresh.app.inject({ url: r.url });
        expect(res.statusCode).toBe(200);
        expect(res.headers['server-timing']).toMatch(/cache;desc="miss"/);
        expect(res.headers['server-timing']).toMatch(/decode;dur=/);
        expect(res.headers.etag).toBe(r.etag);
      }
    } finally {
      await fresh.close();
    }
  });
});
