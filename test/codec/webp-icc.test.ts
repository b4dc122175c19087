import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { webpWithoutIcc } from '../../src/codec/webp-icc.js';

// The container rules are RFC 9649's; sharp (libwebp) is the independent reader here.
describe('webpWithoutIcc', () => {
  const raw = (channels: 3 | 4) => {
    const b = Buffer.alloc(24 * 16 * channels);
    for (let i = 0; i < b.length; i++) b[i] = (i * 37) & 255;
    return sharp(b, { raw: { width: 24, height: 16, channels } });
  };

  it.each([3, 4] as const)('keeps every pixel and drops the profile (%i channels)', async (channels) => {
    const tagged = await raw(channels).withIccProfile('srgb').webp({ quality: 50 }).toBuffer();
    expect((await sharp(tagged).metadata()).icc).toBeInstanceOf(Buffer);
    const bare = webpWithoutIcc(tagged);
    expect(bare.length).toBeLessThan(tagged.length - 300); // libvips's sRGB profile is ~500 bytes (measured)
    const meta = await sharp(bare).metadata();
    expect([meta.icc, meta.hasAlpha, meta.width, meta.height]).toEqual([undefined, channels === 4, 24, 16]);
    const a = await sharp(tagged).raw().toBuffer();
    const b = await sharp(bare).raw().toBuffer();
    expect(b.equals(a)).toBe(true);
    // RIFF size field: the file length minus the 8 bytes of "RIFF" and the size itself.
    expect(bare.readUInt32LE(4)).toBe(bare.length - 8);
  });

  it('returns an untagged file as it is and refuses other bytes', async () => {
    const plain = await raw(3).webp({ quality: 50 }).toBuffer();
    expect(webpWithoutIcc(plain)).toBe(plain);
    expect(() => webpWithoutIcc(Buffer.from('RIFF....WAVE'))).toThrow(RangeError);
  });
});
