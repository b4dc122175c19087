/**
 * Every configured limit answers with its own problem+json code (RFC 9457), and a refusal is
 * never cached. Limits are set low here so small analytic sources reach them.
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PoolTap } from '../faults/pool-tap.js';
import { build, type TestApp } from '../helpers/build.js';
import { writePng } from '../helpers/images.js';
import { memoryEntries } from './cache-probe.js';

let t: TestApp;

const entries = () => memoryEntries(t.app);

async function refused(url: string, status: number, code: string): Promise<void> {
  const before = entries();
  const res = await t.app.inject({ url: `/v1/renditions/${url}` });
  expect(res.statusCode, res.body).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.json()).toMatchObject({ status, code });
  expect(entries()).toBe(before);
}

beforeAll(async () => {
  t = await build({
    config: {
      limits: {
        maxSourceBytes: 200_000,
        maxPixels: 300 * 300,
        maxDimension: 1000,
        maxOutputPixels: 500 * 500,
        maxFrames: 4,
        // Enlargement allowed far enough for the aspect-ratio case below to pass maxDimension.
        enlargement: { default: 1, allowed: 16 },
      },
    },
  });
  const flat = (x: number) => [x & 0xff, 100, 150];
  await writePng(t.sourceDir, 'small.png', 64, 64, 3, flat);
  await writePng(t.sourceDir, 'many-pixels.png', 400, 400, 3, flat);
  await writePng(t.sourceDir, 'long-side.png', 1200, 8, 3, flat);
  const noise = Buffer.from(Array.from({ length: 300 * 300 * 3 }, (_, i) => (i * 2654435761) >>> 24));
  await writeFile(join(t.sourceDir, 'heavy.png'), await sharp(noise, { raw: { width: 300, height: 300, channels: 3 } }).png({ compressionLevel: 0 }).toBuffer());
  const stills = await Promise.all(
    [0, 60, 120, 180, 240, 30].map((v) => sharp({ create: { width: 8, height: 8, channels: 3, background: { r: v, g: 255 - v, b: 9 } } }).png().toBuffer()),
  );
  await writeFile(join(t.sourceDir, 'frames.gif'), await sharp(stills, { join: { animated: true } }).gif().toBuffer());
});
afterAll(() => t.close());

describe('limits, each with its own code', () => {
  it('source bytes: 413 ERR_SOURCE_TOO_LARGE', () => refused('heavy.png?width=32', 413, 'ERR_SOURCE_TOO_LARGE'));
  it('source pixels: 422 ERR_SOURCE_PIXELS_EXCEEDED', () => refused('many-pixels.png?width=32', 422, 'ERR_SOURCE_PIXELS_EXCEEDED'));
  it('source side: 422 ERR_LIMIT_SOURCE_DIMENSION', () => refused('long-side.png?width=32', 422, 'ERR_LIMIT_SOURCE_DIMENSION'));
  it('animation frames: 422 ERR_LIMIT_SOURCE_FRAMES', () => refused('frames.gif?width=4', 422, 'ERR_LIMIT_SOURCE_FRAMES'));
  it('output pixels: 422 ERR_OUTPUT_TOO_LARGE', () => refused('small.png?width=600&height=600', 422, 'ERR_OUTPUT_TOO_LARGE'));
  it('output side (density included): 422 ERR_LIMIT_OUTPUT_DIMENSION', () =>
    refused('small.png?width=400&height=10&density=3&fit=fill', 422, 'ERR_LIMIT_OUTPUT_DIMENSION'));
  it('an output side that follows the aspect ratio past the limit', async () => {
    await writePng(t.sourceDir, 'tall.png', 4, 200, 3, () => [1, 2, 3]);
    // 4 x 200 at width 100 asks 25x; capped at 16x it is still 64 x 3200, past 1000.
    await refused('tall.png?width=100&enlarge=allowed', 422, 'ERR_LIMIT_OUTPUT_DIMENSION');
  });

  it('the service still renders within the limits', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/small.png?width=32&format=png' });
    expect(res.statusCode).toBe(200);
  });
});

describe('deadlines', () => {
  it('render: 503 ERR_RENDER_TIMEOUT when a resample task never finishes', async () => {
    const tap = new PoolTap();
    const held = await build({ poolRunner: tap.runner, config: { limits: { renderTimeoutMs: 50 } } });
    try {
      await writePng(held.sourceDir, 'small.png', 64, 64, 3, () => [10, 20, 30]);
      // The held task honours only its abort signal, as a piscina task does when cancelled.
      tap.nextRun((_original, _task, options) =>
        new Promise((_resolve, reject) => {
          const signal = options?.signal as AbortSignal;
          signal.addEventListener('abort', () => reject(signal.reason), { once: true });
        }),
      );
      const res = await held.app.inject({ url: '/v1/renditions/small.png?width=30&format=png' });
      expect(res.json()).toMatchObject({ status: 503, code: 'ERR_RENDER_TIMEOUT' });
      expect(held.app.renderPool.inFlight).toBe(0);
    } finally {
      await held.close();
    }
  });

  it('decode: 503 ERR_LIMIT_DECODE_TIMEOUT for a decode that cannot finish within 1 ms', async () => {
    const slow = await build({ config: { limits: { decodeTimeoutMs: 1 } } });
    try {
      // 16 megapixels of noise: far more work than one millisecond allows on any machine.
      const side = 4000;
      const px = Buffer.alloc(side * side);
      for (let i = 0; i < px.length; i++) px[i] = (i * 2654435761) >>> 24;
      await writeFile(join(slow.sourceDir, 'big.png'), await sharp(px, { raw: { width: side, height: side, channels: 1 } }).png({ compressionLevel: 1 }).toBuffer());
      const res = await slow.app.inject({ url: '/v1/renditions/big.png?width=64' });
      expect(res.json()).toMatchObject({ status: 503, code: 'ERR_LIMIT_DECODE_TIMEOUT' });
    } finally {
      await slow.close();
    }
  });
});
