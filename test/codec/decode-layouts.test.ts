import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';

// Channel layouts of PNG (W3C PNG Specification, Third Edition, §6.1 colour types 0, 2, 3,
// 4, 6; bit depths 8 and 16) and the first frame of animated GIF and WebP.
const limits = { maxPixels: 40_000_000, maxDimension: 20_000 };
const raw = (width: number, height: number, channels: 1 | 2 | 3 | 4) => ({ raw: { width, height, channels } });

function ramp(n: number, step: number, offset = 0, deep = false): Uint8Array | Uint16Array {
  const data = deep ? new Uint16Array(n) : new Uint8Array(n);
  for (let i = 0; i < n; i++) data[i] = (offset + i * step) % (deep ? 65536 : 256);
  return data;
}

describe('decodeImage: channel layouts', () => {
  it('keeps grey as one channel', async () => {
    const png = await sharp(ramp(64, 3), raw(8, 8, 1)).toColourspace('b-w').png().toBuffer();
    const { raster, hasAlpha, format } = await decodeImage(png, limits);
    expect([raster.channels, hasAlpha, format]).toEqual([1, false, 'png']);
    expect(Array.from(raster.data)).toEqual(Array.from(ramp(64, 3)));
  });

  it('keeps grey + alpha as two channels', async () => {
    const data = ramp(128, 5, 1);
    const png = await sharp(data, raw(8, 8, 2)).toColourspace('b-w').png().toBuffer();
    expect((await sharp(png).metadata()).channels).toBe(2);
    const { raster, hasAlpha } = await decodeImage(png, limits);
    expect([raster.channels, hasAlpha]).toEqual([2, true]);
    expect(Array.from(raster.data)).toEqual(Array.from(data));
  });

  it('keeps RGBA with transparency as four channels, straight alpha', async () => {
    const data = ramp(4 * 4 * 4, 7, 3);
    const { raster, hasAlpha } = await decodeImage(await sharp(data, raw(4, 4, 4)).png().toBuffer(), limits);
    expect([raster.channels, hasAlpha]).toEqual([4, true]);
    expect(Array.from(raster.data)).toEqual(Array.from(data));
  });

  it('drops an alpha channel that is opaque everywhere', async () => {
    const data = new Uint8Array(4 * 4 * 4).map((_, i) => (i % 4 === 3 ? 255 : i));
    const { raster, hasAlpha } = await decodeImage(await sharp(data, raw(4, 4, 4)).png().toBuffer(), limits);
    expect([raster.channels, hasAlpha]).toEqual([3, false]);
    expect(Array.from(raster.data.subarray(0, 6))).toEqual([0, 1, 2, 4, 5, 6]);
  });

  it('expands a palette PNG, transparency included', async () => {
    // Four exact colours, one half transparent: quantisation must keep them as they are.
    const colours = [[200, 10, 30, 255], [10, 200, 30, 255], [10, 30, 200, 255], [250, 250, 250, 128]];
    const data = new Uint8Array(8 * 8 * 4).map((_, i) => colours[Math.floor(i / 4) % 4][i % 4]);
    const png = await sharp(data, raw(8, 8, 4)).png({ palette: true, colours: 4, dither: 0 }).toBuffer();
    expect((await sharp(png).metadata()).isPalette).toBe(true);
    const { raster } = await decodeImage(png, limits);
    expect(raster.channels).toBe(4);
    expect(Array.from(raster.data.subarray(0, 16))).toEqual(colours.flat());
  });

  it('keeps 16-bit PNG samples exactly (values that are not multiples of 257)', async () => {
    const rgb = ramp(5 * 3 * 3, 4099, 1001, true);
    const png = await sharp(rgb, raw(5, 3, 3)).toColourspace('rgb16').png().toBuffer();
    expect((await sharp(png).metadata()).depth).toBe('ushort');
    const { raster } = await decodeImage(png, limits);
    expect(raster.data).toBeInstanceOf(Uint16Array);
    expect(Array.from(raster.data)).toEqual(Array.from(rgb));
    expect(Array.from(rgb).some((v) => v % 257 !== 0)).toBe(true);
  });

  it('keeps 16-bit grey and grey + alpha', async () => {
    const grey = ramp(12, 5003, 77, true);
    const g = await decodeImage(await sharp(grey, raw(4, 3, 1)).toColourspace('grey16').png().toBuffer(), limits);
    expect([g.raster.channels, g.raster.data.constructor]).toEqual([1, Uint16Array]);
    expect(Array.from(g.raster.data)).toEqual(Array.from(grey));
    const ga = ramp(24, 2711, 9, true);
    const a = await decodeImage(await sharp(ga, raw(4, 3, 2)).toColourspace('grey16').png().toBuffer(), limits);
    expect([a.raster.channels, a.hasAlpha]).toEqual([2, true]);
    expect(Array.from(a.raster.data)).toEqual(Array.from(ga));
  });
});

describe('decodeImage: animation', () => {
  // Three 16x16 frames stacked vertically: red, green, blue.
  const frames = [[255, 0, 0], [0, 255, 0], [0, 0, 255]];
  const strip = new Uint8Array(16 * 48 * 3).map((_, i) => frames[Math.floor(i / (16 * 16 * 3))][i % 3]);
  const animated = () => sharp(strip, { raw: { width: 16, height: 48, channels: 3, pageHeight: 16 } });

  it.each([
    ['gif', () => animated().gif({ delay: [100, 100, 100] }).toBuffer()],
    ['webp', () => animated().webp({ lossless: true, delay: [100, 100, 100] }).toBuffer()],
  ])('%s: the first frame only', async (format, make) => {
    const bytes = await make();
    expect((await sharp(bytes).metadata()).pages).toBe(3);
    const { raster, format: got } = await decodeImage(bytes, limits);
    expect(got).toBe(format);
    expect([raster.width, raster.height]).toEqual([16, 16]);
    const last = (16 * 16 - 1) * raster.channels;
    expect(Array.from(raster.data.subarray(last, last + 3))).toEqual([255, 0, 0]);
  });
});
