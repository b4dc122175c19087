import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import type { PixelRaster } from '../../src/core/types.js';
import { decodeImage } from '../../src/codec/decode.js';
import { encodeImage } from '../../src/codec/encode.js';
import { formatSpecs, type OutputFormat } from '../../src/codec/formats.js';
import { pngChunkTypes } from './fixtures.js';

const limits = { maxPixels: 40_000_000, maxDimension: 20_000 };
const white = { r: 255, g: 255, b: 255 };
const green = { r: 0, g: 255, b: 0 };
const formats = Object.keys(formatSpecs) as OutputFormat[];
const sharpName: Record<OutputFormat, string> = { jpeg: 'jpeg', png: 'png', webp: 'webp', avif: 'heif', gif: 'gif' };

/** A smooth colour ramp: lossy codecs keep it within a few codes. */
function gradient(width: number, height: number): PixelRaster {
  const data = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * 3;
      data[i] = Math.round((255 * x) / (width - 1));
      data[i + 1] = Math.round((255 * y) / (height - 1));
      data[i + 2] = 96;
    }
  }
  return { data, width, height, channels: 3 };
}

/**
 * The marker codes of a JPEG stream up to the scan, and the 16 code-length counts of its DC
 * luminance Huffman table (class 0, id 0), from the segment layout of ITU-T T.81 §B.1.1.4/B.2.4.2.
 */
function jpegSegments(jpeg: Buffer): { markers: number[]; dcLuminanceCounts: number[] } {
  const markers: number[] = [];
  let dcLuminanceCounts: number[] = [];
  for (let at = 2; at + 4 <= jpeg.length; ) {
    const marker = jpeg[at + 1];
    const length = jpeg.readUInt16BE(at + 2);
    markers.push(marker);
    if (marker === 0xda) break; // start of scan: entropy-coded data follows
    if (marker === 0xc4) {
      // One DHT segment may hold several tables: Tc/Th byte, 16 counts, then the values.
      for (let t = at + 4; t < at + 2 + length; ) {
        const counts = Array.from(jpeg.subarray(t + 1, t + 17));
        if (jpeg[t] === 0x00) dcLuminanceCounts = counts;
        t += 17 + counts.reduce((a, b) => a + b, 0);
      }
    }
    at += 2 + length;
  }
  return { markers, dcLuminanceCounts };
}

/** The sRGB profile sharp attaches, as the reference for "tagged sRGB". */
async function sharpSrgbProfile(): Promise<Buffer> {
  const tagged = await sharp(new Uint8Array(3), { raw: { width: 1, height: 1, channels: 3 } }).withIccProfile('srgb').jpeg().toBuffer();
  return (await sharp(tagged).metadata()).icc!;
}

describe('encodeImage', () => {
  it.each(formats)('%s: round trip, tagged sRGB, nothing else attached', async (format) => {
    const raster = gradient(64, 48);
    const out = await encodeImage(raster, { format, background: white });
    const meta = await sharp(out).metadata();
    expect(meta.format).toBe(sharpName[format]);
    expect([meta.width, meta.height]).toEqual([64, 48]);
    expect(meta.exif).toBeUndefined();
    expect(meta.xmp).toBeUndefined();
    if (format === 'png') {
      // PNG: the sRGB chunk (W3C PNG Specification, Third Edition, §11.3.2.5), before IDAT.
      const chunks = pngChunkTypes(out);
      expect(chunks.indexOf('sRGB')).toBeGreaterThan(0);
      expect(chunks.indexOf('sRGB')).toBeLessThan(chunks.indexOf('IDAT'));
      // pHYs (pixel density, §11.3.5.3) is the only other chunk libvips writes; it says
      // nothing about the picture's origin.
      expect(chunks.filter((c) => !['IHDR', 'sRGB', 'IDAT', 'IEND', 'pHYs'].includes(c))).toEqual([]);
    } else if (format === 'gif') {
      // GIF89a has no colour tag; browsers show its codes as sRGB (common practice).
      expect(meta.icc).toBeUndefined();
    } else {
      expect(meta.icc?.equals(await sharpSrgbProfile())).toBe(true);
    }
    const back = await decodeImage(out, limits);
    let worst = 0;
    for (let i = 0; i < raster.data.length; i++) worst = Math.max(worst, Math.abs(back.raster.data[i] - raster.data[i]));
    // Lossless PNG is exact; the lossy codecs at their default quality stay close on a ramp
    // (common practice: a few codes); GIF's 256-colour palette dithers single pixels further
    // (Floyd-Steinberg spreads the error; measured 16), but not past two palette steps.
    expect(worst).toBeLessThanOrEqual(format === 'png' ? 0 : format === 'gif' ? 24 : 12);
  });

  it('never lets EXIF, GPS or XMP from a source reach any output', async () => {
    const marker = 'Workshop at 12 Quiet Lane';
    const withGps = await sharp(gradient(32, 32).data, { raw: { width: 32, height: 32, channels: 3 } })
      .withExif({
        IFD0: { ImageDescription: marker, Artist: 'Shop photographer' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 2625/100', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 3948/100' },
      })
      .withXmp(`<x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#"><rdf:Description>${marker}</rdf:Description></rdf:RDF></x:xmpmeta>`)
      .jpeg()
      .toBuffer();
    // The source really carries them (EXIF 2.32 GPS IFD; XMP, ISO 16684-1).
    const source = await sharp(withGps).metadata();
    expect(source.exif?.includes(Buffer.from(marker))).toBe(true);
    expect(source.exif?.includes(Buffer.from('51/1 30/1', 'latin1'))).toBe(false); // stored as rationals
    expect(withGps.includes(Buffer.from('xmpmeta'))).toBe(true);

    const { raster } = await decodeImage(withGps, limits);
    for (const format of formats) {
      const out = await encodeImage(raster, { format, background: white });
      const meta = await sharp(out).metadata();
      expect(meta.exif).toBeUndefined();
      expect(meta.xmp).toBeUndefined();
      for (const needle of [marker, 'Exif\0\0', 'xmpmeta', 'Shop photographer']) {
        expect(out.includes(Buffer.from(needle, 'latin1'))).toBe(false);
      }
    }
  });

  it('writes a 16-bit raster as a 16-bit PNG, exactly, grey staying grey', async () => {
    const rgb = Uint16Array.from({ length: 4 * 3 * 3 }, (_, i) => (i * 5003 + 1001) % 65536);
    const png = await encodeImage({ data: rgb, width: 4, height: 3, channels: 3 }, { format: 'png', background: white });
    expect((await sharp(png).metadata()).depth).toBe('ushort');
    expect(Array.from((await decodeImage(png, limits)).raster.data)).toEqual(Array.from(rgb));
    const grey = Uint16Array.from({ length: 6 }, (_, i) => i * 11111 + 7);
    const g = await encodeImage({ data: grey, width: 3, height: 2, channels: 1 }, { format: 'png', background: white });
    const back = await decodeImage(g, limits);
    expect([back.raster.channels, Array.from(back.raster.data)]).toEqual([1, Array.from(grey)]);
  });

  it('rounds a 16-bit raster to 8 bits for lossy formats (v / 257, to nearest)', async () => {
    const flat = new Uint16Array(16 * 16 * 3).fill(32896 + 128); // 128.5 x 257 -> rounds to 129
    const jpeg = await encodeImage({ data: flat, width: 16, height: 16, channels: 3 }, { format: 'jpeg', quality: 100, background: white });
    const back = await decodeImage(jpeg, limits);
    expect(back.raster.data).toBeInstanceOf(Uint8Array);
    expect(Math.abs(back.raster.data[0] - 129)).toBeLessThanOrEqual(1);
  });

  it('letterboxes an opaque raster with the background colour', async () => {
    const red: PixelRaster = { data: new Uint8Array(4 * 2 * 3).fill(0).map((_, i) => (i % 3 === 0 ? 255 : 0)), width: 4, height: 2, channels: 3 };
    const png = await encodeImage(red, { format: 'png', background: green, canvas: { width: 6, height: 6, left: 1, top: 3 } });
    const { raster } = await decodeImage(png, limits);
    expect([raster.width, raster.height, raster.channels]).toEqual([6, 6, 3]);
    const at = (x: number, y: number) => Array.from(raster.data.subarray((y * 6 + x) * 3, (y * 6 + x) * 3 + 3));
    expect(at(0, 0)).toEqual([0, 255, 0]);
    expect(at(1, 3)).toEqual([255, 0, 0]);
    expect(at(4, 4)).toEqual([255, 0, 0]);
    expect(at(5, 4)).toEqual([0, 255, 0]);
    expect(at(1, 5)).toEqual([0, 255, 0]);
  });

  it('letterboxes a raster with alpha with transparent bars where the format has alpha', async () => {
    const half: PixelRaster = { data: new Uint8Array(2 * 2 * 4).fill(200), width: 2, height: 2, channels: 4 };
    for (const format of ['png', 'webp'] as const) {
      const out = await encodeImage(half, { format, background: green, canvas: { width: 4, height: 2, left: 2, top: 0 } });
      const { data, info } = await sharp(out).raw().toBuffer({ resolveWithObject: true });
      expect(info.channels).toBe(4);
      expect(data[3]).toBe(0); // a bar pixel: transparent
      expect(Math.abs(data[3 * 4 + 3] - 200)).toBeLessThanOrEqual(2); // a picture pixel keeps its alpha
    }
  });

  it('flattens alpha onto the background for JPEG, in encoded values as browsers composite', async () => {
    // Porter & Duff (1984) "over" on sRGB-encoded values, as CSS Compositing and Blending
    // Level 1 §5.1 specifies: black at alpha 128/255 over white -> 255 x (1 - 128/255) = 127.
    const w = 16;
    const data = new Uint8Array(w * w * 4);
    for (let i = 0; i < w * w; i++) data.set(i < (w * w) / 2 ? [0, 0, 0, 0] : [0, 0, 0, 128], i * 4);
    const jpeg = await encodeImage({ data, width: w, height: w, channels: 4 }, { format: 'jpeg', quality: 100, background: white });
    const { raster } = await decodeImage(jpeg, limits);
    expect(raster.channels).toBe(3);
    expect(Math.abs(raster.data[(4 * w + 8) * 3] - 255)).toBeLessThanOrEqual(2); // transparent -> white
    expect(Math.abs(raster.data[(12 * w + 8) * 3] - 127)).toBeLessThanOrEqual(2);
  });

  it('follows the quality setting', async () => {
    const raster = gradient(128, 128);
    for (const format of ['jpeg', 'webp', 'avif'] as const) {
      const low = await encodeImage(raster, { format, quality: 10, background: white });
      const high = await encodeImage(raster, { format, quality: 95, background: white });
      expect(low.length).toBeLessThan(high.length);
    }
  });

  it('writes baseline JPEG with Huffman tables fitted to the picture, 4:2:0 below quality 90 and 4:4:4 from 90', async () => {
    const raster = gradient(64, 48);
    for (const [quality, subsampling] of [[82, '4:2:0'], [89, '4:2:0'], [90, '4:4:4']] as const) {
      const jpeg = await encodeImage(raster, { format: 'jpeg', quality, background: white });
      const { markers, dcLuminanceCounts } = jpegSegments(jpeg);
      // ITU-T T.81 Table B.1: SOF0 (0xC0) is baseline DCT, SOF2 (0xC2) progressive.
      expect(markers.filter((m) => m >= 0xc0 && m <= 0xcf && m !== 0xc4 && m !== 0xc8 && m !== 0xcc)).toEqual([0xc0]);
      // T.81 Annex K.3, Table K.3: the typical luminance DC table has these code-length counts
      // (from memory); optimised coding writes the picture's own, which for this ramp differ.
      expect(dcLuminanceCounts).not.toEqual([0, 1, 5, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0]);
      expect((await sharp(jpeg).metadata()).chromaSubsampling).toBe(subsampling);
    }
  });

  it.each([
    [{ quality: 0 }, 'ERR_PARAM_INVALID'],
    [{ quality: 101 }, 'ERR_PARAM_INVALID'],
    [{ quality: 50.5 }, 'ERR_PARAM_INVALID'],
  ])('refuses %j', async (bad, code) => {
    await expect(encodeImage(gradient(4, 4), { format: 'jpeg', background: white, ...bad })).rejects.toMatchObject({ code });
  });

  it('refuses a canvas the raster does not fit (a caller bug, not a request error)', async () => {
    await expect(
      encodeImage(gradient(8, 8), { format: 'png', background: white, canvas: { width: 8, height: 8, left: 1, top: 0 } }),
    ).rejects.toThrow(RangeError);
  });
});
