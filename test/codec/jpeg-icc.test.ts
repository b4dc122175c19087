import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { encodeImage } from '../../src/codec/encode.js';
import { iccSegments, srgbSegment, tagJpegSrgb } from '../../src/codec/jpeg-icc.js';
import type { PixelRaster } from '../../src/core/types.js';

// The segment layout is the JPEG standard's (ITU-T T.81 B.1: marker, 16-bit length, payload)
// and the ICC profile's embedding the ICC's (ICC.1 B.4: APP2 "ICC_PROFILE"); sharp (libvips,
// lcms2) is the independent writer the spliced bytes are compared with.
const WHITE = { r: 255, g: 255, b: 255 };

/** A cloth-like analytic pattern with noise-free fine detail, `channels` deep. */
function cloth(width: number, height: number, channels: 3 | 4): PixelRaster {
  const data = new Uint8Array(width * height * channels);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = (y * width + x) * channels;
      data[i] = 128 + 127 * Math.sin(x * 0.9 + y * 0.2);
      data[i + 1] = (x * 7 + y * 3) & 255;
      data[i + 2] = (x ^ y) & 255;
      if (channels === 4) data[i + 3] = (x * 5) & 255;
    }
  }
  return { data, width, height, channels };
}

/** What sharp writes when asked to tag the output sRGB itself. */
function sharpTagged(r: PixelRaster, quality: number): Promise<Buffer> {
  return sharp(r.data, { raw: { width: r.width, height: r.height, channels: r.channels } })
    .withIccProfile('srgb')
    .jpeg({ quality, progressive: false, optimiseCoding: true, chromaSubsampling: quality >= 90 ? '4:4:4' : '4:2:0' })
    .toBuffer();
}

describe('the JPEG sRGB tag spliced in', () => {
  it.each([[82, 160, 107], [95, 33, 17], [40, 800, 4]])('gives sharp\'s tagged bytes exactly (quality %i, %ix%i)', async (quality, w, h) => {
    const r = cloth(w, h, 3);
    const ours = await encodeImage(r, { format: 'jpeg', quality, background: WHITE });
    const theirs = await sharpTagged(r, quality);
    expect(ours.length).toBe(theirs.length);
    expect(ours.equals(theirs)).toBe(true);
    const meta = await sharp(ours).metadata();
    expect([meta.width, meta.height, meta.icc?.subarray(36, 40).toString('latin1')]).toEqual([w, h, 'acsp']);
  });

  it('keeps a raster with alpha on sharp\'s own path (flattened, tagged)', async () => {
    const r = cloth(40, 30, 4);
    const ours = await encodeImage(r, { format: 'jpeg', quality: 82, background: WHITE });
    const theirs = await sharp(r.data, { raw: { width: 40, height: 30, channels: 4 } }).flatten({ background: WHITE }).withIccProfile('srgb')
      .jpeg({ quality: 82, progressive: false, optimiseCoding: true, chromaSubsampling: '4:2:0' }).toBuffer();
    expect(ours.equals(theirs)).toBe(true);
  });

  it('takes the profile segment from the header, stops at the scan and refuses other bytes', async () => {
    const seg = await srgbSegment();
    expect([seg[0], seg[1]]).toEqual([0xff, 0xe2]);
    expect(seg.subarray(4, 16).toString('latin1')).toBe('ICC_PROFILE\0');
    expect(seg.readUInt16BE(2) + 2).toBe(seg.length);
    const bare = await sharp(Buffer.alloc(16 * 16 * 3, 90), { raw: { width: 16, height: 16, channels: 3 } }).jpeg().toBuffer();
    expect(iccSegments(bare).length).toBe(0);
    const tagged = await tagJpegSrgb(bare);
    expect(iccSegments(tagged).equals(seg)).toBe(true);
    expect(tagged.length).toBe(bare.length + seg.length);
    await expect(tagJpegSrgb(Buffer.from('GIF89a'))).rejects.toThrow(RangeError);
    expect(() => iccSegments(Buffer.from([0x89, 0x50]))).toThrow(RangeError);
  });
});
