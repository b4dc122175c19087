import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';

// Animated sources through HTTP. GIF89a keeps delays in hundredths of a second and the loop
// count in the NETSCAPE2.0 extension; WebP in its ANIM and ANMF chunks (RFC 9649). CHECKS.md.

const side = 64;
/** One flat colour per frame: a frame that bled into its neighbour would move its mean by tens of codes. */
const colours = [
  [200, 30, 30],
  [30, 200, 30],
  [30, 30, 200],
  [240, 240, 240],
];
const delays = [100, 200, 300, 400];
const loop = 3;

function stacked(): Uint8Array {
  const data = new Uint8Array(side * side * colours.length * 3);
  colours.forEach((c, f) => {
    for (let p = 0; p < side * side; p++) data.set(c, (f * side * side + p) * 3);
  });
  return data;
}

async function animated(format: 'gif' | 'webp'): Promise<Buffer> {
  const img = sharp(stacked(), { raw: { width: side, height: side * colours.length, channels: 3, pageHeight: side } });
  return format === 'gif' ? img.gif({ delay: delays, loop }).toBuffer() : img.webp({ lossless: true, delay: delays, loop }).toBuffer();
}

/** Mean code per channel of each frame of an (animated) image, and its timing. */
async function frames(image: Buffer) {
  const meta = await sharp(image, { pages: -1 }).metadata();
  const { data, info } = await sharp(image, { pages: -1 }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const pages = meta.pages ?? 1;
  const h = info.height / pages;
  const means = Array.from({ length: pages }, (_, f) => {
    const sum = [0, 0, 0];
    for (let p = f * info.width * h; p < (f + 1) * info.width * h; p++) for (let c = 0; c < 3; c++) sum[c] += data[3 * p + c];
    return sum.map((s) => s / (info.width * h));
  });
  return { pages, width: info.width, height: h, means, delay: meta.delay, loop: meta.loop, format: meta.format };
}

describe('animated sources through HTTP', () => {
  let t: TestApp;
  let tight: TestApp;

  beforeAll(async () => {
    // tight: one frame fits the pixel limit, four do not; at most 8 frames.
    [t, tight] = await Promise.all([build(), build({ config: { limits: { maxPixels: 3 * side * side, maxFrames: 8 } } })]);
    const [gif, webp] = await Promise.all([animated('gif'), animated('webp')]);
    for (const app of [t, tight]) {
      await writeFile(join(app.sourceDir, 'swatch.gif'), gif);
      await writeFile(join(app.sourceDir, 'swatch.webp'), webp);
      await writeFile(join(app.sourceDir, 'cut.gif'), gif.subarray(0, Math.floor(gif.length * 0.6)));
    }
  });
  afterAll(() => Promise.all([t.close(), tight.close()]));

  it.each([
    ['swatch.gif', 'gif'],
    ['swatch.gif', 'webp'],
    ['swatch.webp', 'webp'],
    ['swatch.webp', 'gif'],
  ])('%s as %s: every frame kept, each its own colour (no bleeding), delays and loop kept', async (name, format) => {
    const res = await t.app.inject({ url: `/v1/renditions/${name}?width=16&format=${format}` });
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toBe(`image/${format}`);
    const out = await frames(res.rawPayload);
    expect(out.format).toBe(format);
    expect([out.pages, out.width, out.height]).toEqual([4, 16, 16]);
    expect(out.delay).toEqual(delays);
    expect(out.loop).toBe(loop);
    // A flat frame's linear-light mean is its colour: one code for rounding (GIF: exact palette
    // entries); lossy WebP's YUV 4:2:0 coding moves saturated flat colours a few codes more
    // (measured 4; common practice). A frame that read its neighbour's rows would be tens off.
    out.means.forEach((m, f) => m.forEach((v, c) => expect(Math.abs(v - colours[f][c]), `frame ${f} channel ${c}`).toBeLessThanOrEqual(format === 'gif' ? 1 : 6)));
  });

  it.each(['swatch.gif', 'swatch.webp'])('%s as WebP at quality 100: each frame within one code of its own colour', async (name) => {
    // The check (one code per frame) without lossy coding's own error in the way.
    const res = await t.app.inject({ url: `/v1/renditions/${name}?width=16&format=webp&quality=100` });
    expect(res.statusCode).toBe(200);
    const out = await frames(res.rawPayload);
    expect(out.pages).toBe(4);
    out.means.forEach((m, f) => m.forEach((v, c) => expect(Math.abs(v - colours[f][c]), `frame ${f} channel ${c}`).toBeLessThanOrEqual(1)));
  });

  it('negotiates GIF without WebP in Accept, and with it WebP unless the GIF is smaller; Vary: Accept', async () => {
    const gif = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16', headers: { accept: 'image/avif,image/*' } });
    expect(gif.headers['content-type']).toBe('image/gif');
    expect((await frames(gif.rawPayload)).pages).toBe(4);
    const explicit = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16&format=webp' });
    const modern = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16', headers: { accept: 'image/avif,image/webp,*/*' } });
    expect(modern.headers.vary).toContain('Accept');
    expect((await frames(modern.rawPayload)).pages).toBe(4);
    // The smaller of the two animations (tiny flat frames: GIF's palette wins here).
    const smaller = explicit.rawPayload.length < gif.rawPayload.length ? 'image/webp' : 'image/gif';
    expect(modern.headers['content-type']).toBe(smaller);
    expect(modern.rawPayload.length).toBe(Math.min(explicit.rawPayload.length, gif.rawPayload.length));
  });

  it('still=N gives frame N as a still picture; a format that cannot animate shows the first', async () => {
    const still = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16&still=3&format=png' });
    expect(still.statusCode).toBe(200);
    const s = await frames(still.rawPayload);
    expect(s.pages).toBe(1);
    s.means[0].forEach((v, c) => expect(Math.abs(v - colours[2][c])).toBeLessThanOrEqual(1));
    const jpeg = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16&format=jpeg' });
    (await frames(jpeg.rawPayload)).means[0].forEach((v, c) => expect(Math.abs(v - colours[0][c])).toBeLessThanOrEqual(3));
    const missing = await t.app.inject({ url: '/v1/renditions/swatch.gif?width=16&still=9' });
    expect(missing.statusCode).toBe(400);
    expect(missing.json().detail).toContain('it has 4');
  });

  it('the pixel limit counts frames x pixels and says so; one frame of the same source fits', async () => {
    const res = await tight.app.inject({ url: '/v1/renditions/swatch.gif?width=16' });
    expect(res.statusCode).toBe(422);
    expect(res.json().code).toBe('ERR_SOURCE_PIXELS_EXCEEDED');
    expect(res.json().detail).toContain('4 frames of 64x64 pixels');
    expect((await tight.app.inject({ url: '/v1/renditions/swatch.gif?width=16&still=1' })).statusCode).toBe(200);
  });

  it('refuses more frames than limits.maxFrames', async () => {
    // Nine frames of different greys (the GIF writer merges identical frames).
    const greys = new Uint8Array(8 * 8 * 9 * 3).map((_, i) => 20 * Math.floor(i / (8 * 8 * 3)));
    const many = await sharp(greys, { raw: { width: 8, height: 72, channels: 3, pageHeight: 8 } }).gif().toBuffer();
    await writeFile(join(tight.sourceDir, 'many.gif'), many);
    const res = await tight.app.inject({ url: '/v1/renditions/many.gif?width=4' });
    expect(res.statusCode).toBe(422);
    expect(res.json().code).toBe('ERR_LIMIT_SOURCE_FRAMES');
    expect(res.json().detail).toContain('9 frames');
  });

  it('counts every frame in the memory budget: an animation that can never fit is a 413 naming its frames', async () => {
    // 24 frames of 1024x1024 (different greys: the GIF writer merges identical frames) decode to
    // 24 x 1024 x 1024 x 4 bytes (libvips gives GIFs an alpha channel) = 96 MiB before any
    // working copy: past a 64 MiB budget, while one frame (4 MiB) would fit.
    const [n, w] = [24, 1024];
    const greys = new Uint8Array(w * w * n * 3);
    for (let f = 0; f < n; f++) greys.fill(10 * f, f * w * w * 3, (f + 1) * w * w * 3);
    const big = await sharp(greys, { raw: { width: w, height: w * n, channels: 3, pageHeight: w } }).gif({ effort: 1 }).toBuffer();
    const small = await build({ config: { pool: { memoryBudgetBytes: 64 * 2 ** 20 } } });
    try {
      await writeFile(join(small.sourceDir, 'bolts.gif'), big);
      const res = await small.app.inject({ url: '/v1/renditions/bolts.gif?width=64&format=gif' });
      expect(res.statusCode).toBe(413);
      const body = res.json();
      expect(body.code).toBe('ERR_SOURCE_TOO_COSTLY');
      expect(body.detail).toContain(`a ${w}x${w} 8-bit 4-channel source of ${n} frames (pixels counted over every frame)`);
      expect(body.detail).toMatch(/budget is 64 MiB/);
      // The same file as a still needs one frame's memory and renders.
      const still = await small.app.inject({ url: '/v1/renditions/bolts.gif?width=64&still=1&format=png' });
      expect(still.statusCode).toBe(200);
    } finally {
      await small.close();
    }
  });

  it('a truncated animated GIF is a clear 422, not a shorter animation', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/cut.gif?width=16&format=gif' });
    expect(res.statusCode).toBe(422);
    expect(res.json().code).toBe('ERR_SOURCE_CORRUPT');
  });

  it('the alias-risk report says the source is animated and which frame it analysed', async () => {
    const res = await t.app.inject({ url: '/v1/alias-risk/swatch.webp?width=16' });
    expect(res.statusCode).toBe(200);
    expect(res.json().animation).toEqual({ frames: 4, analysed: 'first frame' });
    expect(res.json().source).toMatchObject({ width: 64, height: 64 });
  });
});
