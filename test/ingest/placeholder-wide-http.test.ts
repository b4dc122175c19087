import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { displayP3Profile, p3ToSrgb, withIccChunk } from '../codec/fixtures.js';
import { upload } from './fixtures.js';

// The manifest placeholder of the sources issue 14 keeps as they are: a Display P3 picture
// and an animation. Its mean is a CSS hex colour (sRGB) and its data URI a still.

const hexCodes = (hex: string) => [1, 3, 5].map((i) => Number.parseInt(hex.slice(i, i + 2), 16));
const bytesOf = (uri: string) => Buffer.from(uri.replace(/^data:image\/webp;base64,/, ''), 'base64');

describe('the placeholder of a wide-gamut or animated upload', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
  });
  afterAll(() => t?.close());

  it('a Display P3 source: the mean is converted to sRGB and the WebP keeps its P3 profile', async () => {
    const p3 = [150, 180, 90];
    const flat = await sharp(Buffer.alloc(64 * 40 * 3).map((_, i) => p3[i % 3]), { raw: { width: 64, height: 40, channels: 3 } }).png().toBuffer();
    const m = (await upload(t.app, withIccChunk(flat, await displayP3Profile()), '?widths=48')).json();
    // Expected from the fixture's own matrices (SMPTE RP 177, EG 432-1, IEC 61966-2-1).
    const expected = p3ToSrgb(p3.map((c) => c / 255)).map((v) => Math.round(255 * v));
    // The codes themselves would be wrong by more than a few codes (the test can fail).
    expect(Math.max(...expected.map((v, c) => Math.abs(v - p3[c])))).toBeGreaterThan(10);
    hexCodes(m.placeholder.mean).forEach((v, c) => expect(Math.abs(v - expected[c]), `channel ${c}`).toBeLessThanOrEqual(1));
    // sharp converts the embedded profile to sRGB on decode, as a browser does for display.
    const { data } = await sharp(bytesOf(m.placeholder.dataUri)).raw().toBuffer({ resolveWithObject: true });
    [...data.subarray(0, 3)].forEach((v, c) => expect(Math.abs(v - expected[c]), `channel ${c}`).toBeLessThanOrEqual(4));
  });

  it('an animated GIF: the placeholder is the first frame, a still, and the animated rendition stays animated', async () => {
    const frames = 3;
    const data = new Uint8Array(120 * 80 * frames * 3).map((_, i) => 60 * Math.floor(i / (120 * 80 * 3)) + 40);
    const gif = await sharp(data, { raw: { width: 120, height: 80 * frames, channels: 3, pageHeight: 80 } }).gif({ delay: [100, 100, 100] }).toBuffer();
    const m = (await upload(t.app, gif, '?widths=60&formats=webp,jpeg')).json();
    const { placeholder } = m;
    expect([placeholder.width, placeholder.height, placeholder.mean]).toEqual([32, 21, '#282828']); // 32 x 80/120; frame 1 is 40
    const meta = await sharp(bytesOf(placeholder.dataUri)).metadata();
    expect([meta.pages ?? 1, meta.width, meta.height]).toEqual([1, 32, 21]);
    // The same size and format asked by URL is the animation, not the placeholder's still.
    const url = m.renditions[0].url.replace(/\?.*$/, '?width=32&format=webp&quality=50');
    const res = await t.app.inject({ url });
    expect(res.statusCode).toBe(200);
    expect((await sharp(res.rawPayload).metadata()).pages).toBe(3);
  });
});
