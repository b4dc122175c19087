import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';
import { probeSpooledDecode } from '../../src/codec/spool-decode.js';
import { encodeGrating, flipMiddleThird, truncated, withFrameSize } from '../helpers/damage.js';

const limits = { maxPixels: 100_000_000, maxDimension: 10_000 };
let dir: string;
const damaged: Record<string, Buffer> = {};

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fw-damage-'));
  const [jpeg, webp, tiff] = await Promise.all([encodeGrating('jpeg'), encodeGrating('webp'), encodeGrating('tiff')]);
  damaged['JPEG, bytes flipped in the middle third'] = flipMiddleThird(jpeg);
  damaged['WebP, bytes flipped in the middle third'] = flipMiddleThird(webp);
  damaged['JPEG, scan cut at 60 %'] = truncated(jpeg, 0.6);
  damaged['JPEG, scan cut at 97 %'] = truncated(jpeg, 0.97);
  damaged['JPEG, frame header 8000x8000 over 1200x900 data'] = withFrameSize(jpeg, 8000, 8000);
  damaged['TIFF, cut at 60 %'] = truncated(tiff, 0.6);
});
afterAll(() => rm(dir, { recursive: true, force: true }));

describe('damaged sources are refused as corrupt, never half-decoded', () => {
  it('the undamaged files decode (the damage, not the file, is refused)', async () => {
    for (const format of ['jpeg', 'webp', 'tiff'] as const) {
      const good = await decodeImage(await encodeGrating(format), limits);
      expect([good.raster.width, good.raster.height]).toEqual([1200, 900]);
    }
  });

  it('the frame-header lie is one sharp reads as 8000x8000 (so it is the data that gives it away)', async () => {
    const meta = await sharp(damaged['JPEG, frame header 8000x8000 over 1200x900 data']).metadata();
    expect([meta.width, meta.height]).toEqual([8000, 8000]);
  });

  it.each(['JPEG, bytes flipped in the middle third', 'WebP, bytes flipped in the middle third', 'JPEG, scan cut at 60 %', 'JPEG, scan cut at 97 %', 'JPEG, frame header 8000x8000 over 1200x900 data', 'TIFF, cut at 60 %'])(
    '%s: decoded in memory',
    async (name) => {
      await expect(decodeImage(damaged[name], limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_CORRUPT', status: 422 });
    },
  );

  it.each(['JPEG, bytes flipped in the middle third', 'JPEG, scan cut at 60 %', 'JPEG, frame header 8000x8000 over 1200x900 data'])(
    '%s: decoded into a spool file',
    async (name) => {
      const probe = await probeSpooledDecode(damaged[name], limits);
      expect(probe).not.toBeNull(); // the header is readable: the damage shows only in the data
      await expect(probe!.write(join(dir, `${name.length}.v`))).rejects.toMatchObject({ code: 'ERR_SOURCE_CORRUPT', status: 422 });
      await probe!.idle();
    },
  );
});
