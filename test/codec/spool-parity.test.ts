import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';
import { probeSpooledDecode } from '../../src/codec/spool-decode.js';
import { displayP3Profile, withIccChunk } from './fixtures.js';

const limits = { maxPixels: 40_000_000, maxDimension: 20_000 };
const raw = (width: number, height: number, channels: 1 | 3) => ({ raw: { width, height, channels } });

/** A seeded pattern of gradients and noise, the same on every run (analytic test input). */
function pattern(width: number, height: number, channels: number, deep = false): Uint8Array | Uint16Array {
  const max = deep ? 65535 : 255;
  const data = deep ? new Uint16Array(width * height * channels) : new Uint8Array(width * height * channels);
  let s = 7;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      for (let c = 0; c < channels; c++) {
        s = (s * 1103515245 + 12345) >>> 0;
        const v = 0.5 + 0.35 * Math.sin((x * (c + 1)) / 9 + y / 13) + ((s >>> 16) / 65536 - 0.5) * 0.2;
        data[(y * width + x) * channels + c] = Math.round(Math.max(0, Math.min(1, v)) * max);
      }
    }
  }
  return data;
}

/**
 * The spooled decode must hand the workers exactly the samples decodeImage gives the in-memory
 * path, whatever sharp had to do on the way (orientation, colour conversion, 16-bit, CMYK):
 * the overlapped and the plain render then agree byte for byte.
 */
describe('probeSpooledDecode: the spool file holds decodeImage samples', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-spool-parity-'));
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  async function expectParity(name: string, bytes: Buffer): Promise<void> {
    const probe = await probeSpooledDecode(bytes, limits);
    expect(probe).not.toBeNull();
    const file = join(dir, `${name}.v`);
    await probe!.write(file);
    const { raster } = await decodeImage(bytes, limits);
    expect([probe!.width, probe!.height, probe!.channels]).toEqual([raster.width, raster.height, raster.channels]);
    expect(probe!.depth).toBe(raster.data instanceof Uint16Array ? 16 : 8);
    const spooled = await readFile(file);
    const expected = Buffer.from(raster.data.buffer, raster.data.byteOffset, raster.data.byteLength);
    // libvips' file: a 64-byte header, then the pixels (feed.ts), then metadata.
    expect(spooled.subarray(64, 64 + expected.length).equals(expected)).toBe(true);
  }

  const w = 37;
  const h = 23;
  it.each([1, 2, 3, 4, 5, 6, 7, 8])('JPEG with EXIF orientation %i (upright, as decodeImage)', async (orientation) => {
    const jpeg = await sharp(pattern(w, h, 3), raw(w, h, 3)).jpeg({ quality: 90 }).withMetadata({ orientation }).toBuffer();
    await expectParity(`orientation-${orientation}`, jpeg);
  });

  it('CMYK JPEG (converted to sRGB)', async () => {
    const cmyk = await sharp(pattern(w, h, 3), raw(w, h, 3)).toColourspace('cmyk').jpeg({ quality: 95 }).toBuffer();
    expect((await sharp(cmyk).metadata()).space).toBe('cmyk');
    await expectParity('cmyk', cmyk);
  });

  it('8-bit grey PNG, 16-bit grey PNG and 16-bit RGB PNG', async () => {
    await expectParity('grey8', await sharp(pattern(w, h, 1), raw(w, h, 1)).png().toBuffer());
    const grey16 = await sharp(pattern(w, h, 1, true), raw(w, h, 1)).toColourspace('grey16').png().toBuffer();
    await expectParity('grey16', grey16);
    const rgb16 = await sharp(pattern(w, h, 3, true), raw(w, h, 3)).toColourspace('rgb16').png().toBuffer();
    await expectParity('rgb16', rgb16);
  });

  it('8- and 16-bit PNG with a Display P3 profile (converted to sRGB)', async () => {
    const icc = await displayP3Profile();
    await expectParity('p3-8', withIccChunk(await sharp(pattern(w, h, 3), raw(w, h, 3)).png().toBuffer(), icc));
    const deep = await sharp(pattern(w, h, 3, true), raw(w, h, 3)).toColourspace('rgb16').png().toBuffer();
    await expectParity('p3-16', withIccChunk(deep, icc));
  });

  it('a source with alpha is not spooled; one without is, with the header limits of decodeImage', async () => {
    const rgba = await sharp(pattern(w, h, 3), raw(w, h, 3)).ensureAlpha(0.5).png().toBuffer();
    expect(await probeSpooledDecode(rgba, limits)).toBeNull();
    const jpeg = await sharp(pattern(w, h, 3), raw(w, h, 3)).jpeg().toBuffer();
    await expect(probeSpooledDecode(jpeg, { maxPixels: 100, maxDimension: 20_000 })).rejects.toMatchObject({ code: 'ERR_SOURCE_PIXELS_EXCEEDED' });
    await expect(probeSpooledDecode(jpeg, { maxPixels: 40_000_000, maxDimension: 30 })).rejects.toMatchObject({ code: 'ERR_LIMIT_SOURCE_DIMENSION' });
  });
});
