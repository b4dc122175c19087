import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';
import { withHeaderSize } from './fixtures.js';

const limits = { maxPixels: 1_000_000, maxDimension: 4000 };

async function noise(format: 'jpeg' | 'png', width = 256, height = 256): Promise<Buffer> {
  let s = 12345;
  const data = new Uint8Array(width * height * 3).map(() => ((s = (s * 1103515245 + 12345) >>> 0) >>> 24));
  return sharp(data, { raw: { width, height, channels: 3 } })[format]().toBuffer();
}

describe('decodeImage refuses', () => {
  it.each(['jpeg', 'png'] as const)('a truncated %s, rather than half-decode it', async (format) => {
    const whole = await noise(format);
    await expect(decodeImage(whole, limits)).resolves.toMatchObject({ format, raster: { width: 256, height: 256, channels: 3 } });
    for (const keep of [0.3, 0.6, 0.95]) {
      const cut = whole.subarray(0, Math.floor(whole.length * keep));
      const error = await decodeImage(cut, limits).catch((e: unknown) => e);
      expect(error).toMatchObject({ code: 'ERR_SOURCE_CORRUPT', status: 422 });
      expect((error as Error).cause).toBeInstanceOf(Error); // sharp's own message travels along
    }
  });

  it('a JPEG cut inside its header', async () => {
    const whole = await noise('jpeg');
    await expect(decodeImage(whole.subarray(0, 200), limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_CORRUPT' });
  });

  it('a source over the pixel limit, from its header alone', async () => {
    // The IHDR claims 30000 x 30000 but the data is that of a 16 x 16 image: only a header
    // check can give the pixel-limit answer (decoding would fail as corrupt instead).
    const small = await sharp(new Uint8Array(16 * 16 * 3), { raw: { width: 16, height: 16, channels: 3 } }).png().toBuffer();
    const liar = withHeaderSize(small, 30000, 30000);
    expect((await sharp(liar, { limitInputPixels: false }).metadata()).width).toBe(30000);
    await expect(decodeImage(liar, { maxPixels: 50_000_000, maxDimension: 40000 })).rejects.toMatchObject({
      code: 'ERR_SOURCE_PIXELS_EXCEEDED',
      status: 422,
    });
  });

  it('a source over the pixel limit or the dimension limit', async () => {
    const png = await noise('png', 1200, 900); // 1.08 MP
    await expect(decodeImage(png, limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_PIXELS_EXCEEDED' });
    await expect(decodeImage(png, { maxPixels: 2_000_000, maxDimension: 1000 })).rejects.toMatchObject({
      code: 'ERR_LIMIT_SOURCE_DIMENSION',
    });
    await expect(decodeImage(png, { maxPixels: 1_080_000, maxDimension: 1200 })).resolves.toMatchObject({ raster: { width: 1200, height: 900 } });
  });

  it.each([
    ['zero bytes', Buffer.alloc(0)],
    ['text', Buffer.from('This is a price list, not a picture.\n')],
    ['random bytes', Buffer.from(Array.from({ length: 512 }, (_, i) => (i * 131 + 7) % 256))],
    ['SVG', Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><rect width="10" height="10"/></svg>')],
    ['PDF', Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n')],
  ])('%s as unsupported', async (_name, bytes) => {
    await expect(decodeImage(bytes, limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_UNSUPPORTED', status: 415 });
  });

  it('an SVG that tries to read a local file: refused before rendering', async () => {
    const svg = Buffer.from(
      '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="8" height="8">' +
        '<image xlink:href="file:///etc/passwd" width="8" height="8"/></svg>',
    );
    await expect(decodeImage(svg, limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_UNSUPPORTED' });
  });
});
