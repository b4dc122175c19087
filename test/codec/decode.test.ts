import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';
import { displayP3Profile, p3ToSrgb, withHeaderSize, withIccChunk } from './fixtures.js';

const limits = { maxPixels: 40_000_000, maxDimension: 20_000 };

/** A raster with one value everywhere, as sharp raw input. */
function flat(width: number, height: number, pixel: number[], deep = false): Uint8Array | Uint16Array {
  const data = deep ? new Uint16Array(width * height * pixel.length) : new Uint8Array(width * height * pixel.length);
  for (let i = 0; i < data.length; i++) data[i] = pixel[i % pixel.length];
  return data;
}
const raw = (width: number, height: number, channels: 1 | 2 | 3 | 4) => ({ raw: { width, height, channels } });

describe('decodeImage: EXIF orientation', () => {
  // EXIF 2.32 (CIPA DC-008-2019), tag 0x0112 Orientation: where stored row 0 and column 0
  // are shown. Maps a stored pixel (x, y) of a w x h image to its displayed position.
  const shown: Record<number, (x: number, y: number, w: number, h: number) => [number, number]> = {
    1: (x, y) => [x, y],
    2: (x, y, w) => [w - 1 - x, y],
    3: (x, y, w, h) => [w - 1 - x, h - 1 - y],
    4: (x, y, _w, h) => [x, h - 1 - y],
    5: (x, y) => [y, x],
    6: (x, y, _w, h) => [h - 1 - y, x],
    7: (x, y, w, h) => [h - 1 - y, w - 1 - x],
    8: (x, y, w) => [y, w - 1 - x],
  };
  const w = 48;
  const h = 32;
  // 8x8 marker blocks (one JPEG block each, so they survive compression): red at the stored
  // top-left, green at top-right, blue at bottom-left, on grey.
  const marks = [
    { bx: 0, by: 0, rgb: [255, 0, 0] },
    { bx: 5, by: 0, rgb: [0, 255, 0] },
    { bx: 0, by: 3, rgb: [0, 0, 255] },
  ];
  const stored = flat(w, h, [128, 128, 128]) as Uint8Array;
  for (const m of marks) {
    for (let y = m.by * 8; y < m.by * 8 + 8; y++) {
      for (let x = m.bx * 8; x < m.bx * 8 + 8; x++) stored.set(m.rgb, (y * w + x) * 3);
    }
  }

  it.each([1, 2, 3, 4, 5, 6, 7, 8])('orientation %i shows the marked corners where EXIF says', async (orientation) => {
    const jpeg = await sharp(stored, raw(w, h, 3)).jpeg({ quality: 100 }).withMetadata({ orientation }).toBuffer();
    expect((await sharp(jpeg).metadata()).orientation).toBe(orientation);
    const { raster } = await decodeImage(jpeg, limits);
    const swapped = orientation >= 5;
    expect([raster.width, raster.height]).toEqual(swapped ? [h, w] : [w, h]);
    for (const m of marks) {
      // Centre of the marker block, stored (4 + 8 bx, 4 + 8 by), mapped to display.
      const [x, y] = shown[orientation](m.bx * 8 + 4, m.by * 8 + 4, w, h);
      const at = (y * raster.width + x) * raster.channels;
      const got = Array.from(raster.data.subarray(at, at + 3));
      got.forEach((v, c) => expect(Math.abs(v - m.rgb[c])).toBeLessThanOrEqual(12));
    }
  });
});

describe('decodeImage: colour', () => {
  // Expected values: Display P3 -> sRGB through XYZ from the published primaries (see
  // fixtures.ts). The ICC path adapts both D65 whites to D50 and back (ICC.1:2022, Annex E)
  // and stores s15Fixed16 numbers, so a small tolerance remains: 1.5 codes at 8 bit, 0.2 %
  // of full scale at 16 bit (from memory: typical lcms matrix-shaper round-off).
  const p3Colours = [
    [0.6, 0.45, 0.3],
    [0.3, 0.5, 0.7],
    [0.82, 0.8, 0.55],
  ];

  it('converts an 8-bit Display P3 PNG to sRGB', async () => {
    const icc = await displayP3Profile();
    for (const colour of p3Colours) {
      const codes = colour.map((c) => Math.round(c * 255));
      const png = withIccChunk(await sharp(flat(4, 4, codes), raw(4, 4, 3)).png().toBuffer(), icc);
      expect((await sharp(png).metadata()).icc?.length).toBe(icc.length);
      const { raster } = await decodeImage(png, limits);
      expect(raster.data).toBeInstanceOf(Uint8Array);
      const expected = p3ToSrgb(codes.map((c) => c / 255)).map((v) => v * 255);
      expected.forEach((e, c) => expect(Math.abs(raster.data[c] - e)).toBeLessThanOrEqual(1.5));
      // The samples as stored differ from sRGB by far more than the tolerance.
      expect(Math.max(...expected.map((e, c) => Math.abs(e - codes[c])))).toBeGreaterThan(5);
    }
  });

  it('converts a 16-bit Display P3 PNG to sRGB and keeps 16 bits', async () => {
    const icc = await displayP3Profile();
    for (const colour of p3Colours) {
      const codes = colour.map((c) => Math.round(c * 65535));
      const source = await sharp(flat(4, 4, codes, true), raw(4, 4, 3)).toColourspace('rgb16').png().toBuffer();
      const png = withIccChunk(source, icc);
      const { raster } = await decodeImage(png, limits);
      expect(raster.data).toBeInstanceOf(Uint16Array);
      const expected = p3ToSrgb(codes.map((c) => c / 65535)).map((v) => v * 65535);
      expected.forEach((e, c) => expect(Math.abs(raster.data[c] - e)).toBeLessThanOrEqual(0.002 * 65535));
    }
  });

  it('shows why: sharp alone leaves 16-bit P3 input in P3', async () => {
    // CHECKS.md: "16-bit input stays in a wide working space unless the output is forced to
    // sRGB". If this ever stops failing, the explicit conversion in decode.ts is redundant.
    const icc = await displayP3Profile();
    const codes = [0.3, 0.5, 0.7].map((c) => Math.round(c * 65535));
    const png = withIccChunk(await sharp(flat(2, 2, codes, true), raw(2, 2, 3)).toColourspace('rgb16').png().toBuffer(), icc);
    const plain = await sharp(png).toColourspace('rgb16').raw({ depth: 'ushort' }).toBuffer();
    const naive = new Uint16Array(plain.buffer, plain.byteOffset, 3);
    const expected = p3ToSrgb(codes.map((c) => c / 65535)).map((v) => v * 65535);
    expect(Math.abs(naive[0] - expected[0])).toBeGreaterThan(0.01 * 65535);
  });

  it('takes untagged 16-bit input as sRGB, unchanged', async () => {
    const codes = [1000, 12345, 65534];
    const png = await sharp(flat(3, 2, codes, true), raw(3, 2, 3)).toColourspace('rgb16').png().toBuffer();
    const { raster } = await decodeImage(png, limits);
    expect(Array.from(raster.data.subarray(0, 3))).toEqual(codes);
  });

  it('converts CMYK JPEG to three-channel sRGB', async () => {
    // sharp's CMYK conversion uses a print profile, whose gamut is smaller than sRGB's: only
    // coarse checks hold (common practice): paper white stays white, grey stays neutral.
    const source = [255, 255, 255, 128, 128, 128];
    const cmyk = await sharp(flat(16, 8, [255, 255, 255]).map((v, i) => (i >= 16 * 4 * 3 ? 128 : v)), raw(16, 8, 3))
      .toColourspace('cmyk')
      .jpeg({ quality: 100 })
      .toBuffer();
    expect((await sharp(cmyk).metadata()).space).toBe('cmyk');
    const { raster } = await decodeImage(cmyk, limits);
    expect(raster.channels).toBe(3);
    const white = Array.from(raster.data.subarray(0, 3));
    white.forEach((v) => expect(v).toBeGreaterThanOrEqual(250));
    const grey = Array.from(raster.data.subarray(16 * 6 * 3, 16 * 6 * 3 + 3));
    expect(Math.max(...grey) - Math.min(...grey)).toBeLessThanOrEqual(8);
    expect(Math.abs(grey[1] - source[4])).toBeLessThanOrEqual(20);
  });
});
