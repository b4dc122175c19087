import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';

// Two workers split the output rows of one big rendition over a shared copy of the source.
// Splitting must not change a single byte: PNG is lossless, so compare bodies exactly.
describe('worker pool: split rendering', () => {
  let one: TestApp;
  let two: TestApp;
  beforeAll(async () => {
    one = await build();
    two = await build({ sourceDir: one.sourceDir, config: { pool: { threads: 2 } } });
    // A diagonal grating plus a vertical ramp: every output row differs from its neighbours.
    await writePng(one.sourceDir, 'grating.png', 300, 300, 3, (x, y) => [
      Math.round(127.5 + 127.5 * Math.sin((x + 2 * y) / 3)),
      Math.round((255 * y) / 299),
      (x * 7) & 255,
    ]);
  });
  afterAll(async () => {
    await two.close();
    await one.close();
  });

  it.each([
    ['upscale (rows split in two)', 'width=700&format=png&enlarge=allowed'],
    ['downscale to a big output', 'width=600&height=520&fit=fill&format=png&enlarge=allowed'],
    ['small output (one band)', 'width=64&format=png'],
  ])('%s: one worker and two workers give identical bytes', async (_what, q) => {
    const url = `/v1/renditions/grating.png?${q}`;
    const a = await one.app.inject({ url });
    const b = await two.app.inject({ url });
    expect(a.statusCode).toBe(200);
    expect(b.statusCode).toBe(200);
    expect(b.rawPayload.equals(a.rawPayload)).toBe(true);
  });
});
