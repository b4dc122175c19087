/**
 * Our WebP bitstream check (src/codec/webp): every WebP sharp (libwebp) makes passes it, at
 * every quality, size, with alpha, lossless and animated; damage libwebp decodes without any
 * error is refused. Pictures are analytic (gratings, a weave, flat fields, ramps).
 */
import sharp, { type WebpOptions } from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeImage } from '../../src/codec/decode.js';
import { checkWebp } from '../../src/codec/webp/check.js';
import { gratingRaw, weaveRaw } from '../helpers/damage.js';

const limits = { maxPixels: 100_000_000, maxDimension: 16_383 };

/** A deterministic generator (numerical-recipes LCG constants, common practice). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32;
}

function picture(kind: number, w: number, h: number, channels: 3 | 4): Buffer {
  const rgb = kind === 0 ? gratingRaw(w, h) : kind === 1 ? weaveRaw(w, h) : Buffer.alloc(w * h * 3, 97);
  if (channels === 3) return rgb;
  const out = Buffer.alloc(w * h * 4);
  for (let i = 0; i < w * h; i++) {
    rgb.copy(out, 4 * i, 3 * i, 3 * i + 3);
    out[4 * i + 3] = (i * 7) % 256; // an alpha ramp: not opaque, so libwebp keeps it
  }
  return out;
}

const sizes: Array<[number, number]> = [[1, 1], [2, 3], [7, 300], [15, 17], [16, 16], [17, 1], [33, 65], [100, 75], [241, 160], [320, 240], [400, 8], [257, 257]];
const options: WebpOptions[] = [
  ...[1, 5, 25, 50, 75, 90, 100].map((quality) => ({ quality })),
  { quality: 80, effort: 0 },
  { quality: 80, effort: 6, smartSubsample: true },
  { quality: 60, preset: 'text' },
  { quality: 70, preset: 'photo', smartDeblock: true },
  { lossless: true },
  { nearLossless: true, quality: 60 },
];

describe('valid WebPs pass the bitstream check', () => {
  it('hundreds of sharp-made stills: all qualities, sizes, presets, with and without alpha, lossless', async () => {
    let n = 0;
    for (const [w, h] of sizes) {
      for (const [k, opts] of options.entries()) {
        for (const channels of [3, 4] as const) {
          const bytes = await sharp(picture((k + w) % 3, w, h, channels), { raw: { width: w, height: h, channels } }).webp(opts).toBuffer();
          await expect(checkWebp(bytes), `${w}x${h} ${JSON.stringify(opts)} ${channels}ch`).resolves.toBeUndefined();
          const decoded = await decodeImage(bytes, limits);
          expect([decoded.raster.width, decoded.raster.height]).toEqual([w, h]);
          n++;
        }
      }
    }
    expect(n).toBe(sizes.length * options.length * 2);
  }, 180_000);

  it('animated WebPs (lossy with alpha, lossless, mixed) and one with metadata chunks', async () => {
    const stills = await Promise.all(
      [0, 1, 2, 3].map((k) => sharp(picture(k % 3, 48, 40, 4), { raw: { width: 48, height: 40, channels: 4 } }).png().toBuffer()),
    );
    for (const opts of [{ quality: 50 }, { lossless: true }, { quality: 80, mixed: true }] as WebpOptions[]) {
      const bytes = await sharp(stills, { join: { animated: true } }).webp(opts).toBuffer();
      await expect(checkWebp(bytes), JSON.stringify(opts)).resolves.toBeUndefined();
      await expect(decodeImage(bytes, { ...limits, maxFrames: 16 })).resolves.toMatchObject({ format: 'webp' });
    }
    const withMeta = await sharp(picture(0, 64, 48, 3), { raw: { width: 64, height: 48, channels: 3 } }).withMetadata().webp().toBuffer();
    await expect(checkWebp(withMeta)).resolves.toBeUndefined();
  }, 60_000);
});

describe('damaged WebPs are refused', () => {
  it('random bit flips past the headers: every one refused, including those libwebp decodes silently', async () => {
    let libwebpMissed = 0;
    let refused = 0;
    let total = 0;
    for (const quality of [20, 50, 80, 95]) {
      const good = await sharp(weaveRaw(320, 240), { raw: { width: 320, height: 240, channels: 3 } }).webp({ quality }).toBuffer();
      const rnd = lcg(quality);
      for (let k = 0; k < 30; k++) {
        const bytes = Buffer.from(good);
        for (let f = 0; f <= k % 4; f++) bytes[40 + Math.floor(rnd() * (bytes.length - 40))] ^= 1 << Math.floor(rnd() * 8);
        total++;
        if (await sharp(bytes, { failOn: 'warning' }).raw().toBuffer().then(() => true, () => false)) libwebpMissed++;
        const e = await decodeImage(bytes, limits).then(() => null, (err: unknown) => err);
        if ((e as { code?: string } | null)?.code === 'ERR_SOURCE_CORRUPT') refused++;
      }
    }
    expect(libwebpMissed).toBeGreaterThan(0); // so the cases below libwebp's radar are in the set
    expect(refused).toBe(total);
  }, 120_000);

  const base = () => sharp(weaveRaw(64, 48), { raw: { width: 64, height: 48, channels: 3 } }).webp({ quality: 70 }).toBuffer();
  const withAlpha = () => sharp(picture(1, 64, 48, 4), { raw: { width: 64, height: 48, channels: 4 } }).webp({ quality: 70 }).toBuffer();
  const find = (b: Buffer, fourcc: string) => b.indexOf(Buffer.from(fourcc, 'latin1'), 12);
  const cases: Array<[string, () => Promise<Buffer>, RegExp]> = [
    ['bytes after the RIFF container', async () => Buffer.concat([await base(), Buffer.from('tail')]), /follow the end/],
    ['a file shorter than its RIFF size', async () => (await base()).subarray(0, -7), /cut short/],
    ['a chunk size past the container', async () => { const b = Buffer.from(await base()); b.writeUInt32LE(b.readUInt32LE(16) + 100, 16); return b; }, /runs past/],
    ['no VP8 start code', async () => { const b = Buffer.from(await base()); b[23] ^= 0xff; return b; }, /start code/],
    ['a first partition size past the chunk', async () => { const b = Buffer.from(await base()); b[22] = 0xff; return b; }, /runs past its chunk/],
    ['a VP8X canvas other than the VP8 frame', async () => { const b = Buffer.from(await withAlpha()); b.writeUIntLE(99, find(b, 'VP8X') + 12, 3); return b; }, /container says/],
    ['an ALPH chunk naming compression 3', async () => { const b = Buffer.from(await withAlpha()); b[find(b, 'ALPH') + 8] |= 3; return b; }, /unknown method/],
  ];
  it.each(cases)('%s', async (_name, make, message) => {
    const bytes = await make();
    await expect(checkWebp(bytes)).rejects.toThrow(message);
    await expect(decodeImage(bytes, limits)).rejects.toMatchObject({ code: 'ERR_SOURCE_CORRUPT', status: 422 });
  });

  it('a VP8L image with version 1', async () => {
    const b = Buffer.from(await sharp(weaveRaw(64, 48), { raw: { width: 64, height: 48, channels: 3 } }).webp({ lossless: true }).toBuffer());
    const at = find(b, 'VP8L') + 8;
    b[at + 4] |= 0x20; // the lowest of the three version bits (bits 29..31 of the header word)
    await expect(checkWebp(b)).rejects.toThrow(/version/);
  });
});
