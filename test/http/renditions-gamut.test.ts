import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isWideGamutProfile } from '../../src/codec/icc.js';
import { build, type TestApp } from '../helpers/build.js';
import { displayP3Profile, p3ToSrgb, pngChunkTypes } from '../codec/fixtures.js';

// Wide-gamut sources through HTTP. Display P3: SMPTE EG 432-1 primaries, D65, the sRGB curve
// (CHECKS.md); lcms, as sharp carries it, is the reference library for every conversion.

const side = 128;
/** Quadrants in Display P3 codes: orange and red outside sRGB, a tan and a grey inside it. */
const quadrants = [
  [255, 120, 0],
  [255, 0, 0],
  [150, 120, 100],
  [128, 128, 128],
];

/** A Display P3 JPEG as phone cameras write them: P3 codes, the P3 profile embedded. */
async function p3Jpeg(): Promise<Buffer> {
  const data = new Uint16Array(side * side * 3);
  for (let y = 0; y < side; y++) {
    for (let x = 0; x < side; x++) {
      const q = quadrants[(y < side / 2 ? 0 : 2) + (x < side / 2 ? 0 : 1)];
      for (let c = 0; c < 3; c++) data[(y * side + x) * 3 + c] = q[c] * 257;
    }
  }
  // 16-bit raw: sharp's processing profile is P3, so tagging P3 converts nothing.
  return sharp(data, { raw: { width: side, height: side, channels: 3 } })
    .withIccProfile('p3')
    .jpeg({ quality: 100, chromaSubsampling: '4:4:4' })
    .toBuffer();
}

/** Codes at the centre of each quadrant, read as stored (no colour conversion). */
async function quadrantCodes(image: Buffer): Promise<number[][]> {
  const { data, info } = await sharp(image, { ignoreIcc: true }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const at = (x: number, y: number) => Array.from(data.subarray((y * info.width + x) * 3, (y * info.width + x) * 3 + 3));
  const [a, b] = [Math.floor(info.width / 4), Math.floor((3 * info.width) / 4)];
  const [c, d] = [Math.floor(info.height / 4), Math.floor((3 * info.height) / 4)];
  return [at(a, c), at(b, c), at(a, d), at(b, d)];
}

function within(actual: number[][], expected: number[][], codes: number) {
  actual.forEach((px, i) => px.forEach((v, c) => expect(Math.abs(v - expected[i][c]), `quadrant ${i} channel ${c}: ${v} vs ${expected[i][c]}`).toBeLessThanOrEqual(codes)));
}

describe('wide-gamut sources through HTTP', () => {
  let t: TestApp;
  let source: Buffer;

  beforeAll(async () => {
    t = await build();
    source = await p3Jpeg();
    await writeFile(join(t.sourceDir, 'p3.jpg'), source);
  });
  afterAll(() => t.close());

  it.each(['jpeg', 'webp', 'avif', 'png'] as const)('%s: a Display P3 source stays Display P3, each colour within one code (lossless) or a few (lossy)', async (format) => {
    const res = await t.app.inject({ url: `/v1/renditions/p3.jpg?width=64&format=${format}` });
    expect(res.statusCode).toBe(200);
    const meta = await sharp(res.rawPayload).metadata();
    expect(meta.icc?.equals(await displayP3Profile())).toBe(true);
    expect(isWideGamutProfile(meta.icc)).toBe(true);
    // The source's own codes (what it stores), against the rendition's: one code for the
    // resampler's rounding, plus what the lossy coders move a flat field (JPEG q100 4:4:4 in
    // the source; WebP's and AVIF's default qualities move flat saturated colours by a few codes).
    const expected = await quadrantCodes(source);
    within(await quadrantCodes(res.rawPayload), expected, format === 'png' ? 1 : format === 'jpeg' ? 2 : 4);
    if (format === 'png') {
      // PNG says its colour space with the profile (iCCP, W3C PNG Third Edition §11.3.2.4), not sRGB.
      const chunks = pngChunkTypes(res.rawPayload);
      expect(chunks).toContain('iCCP');
      expect(chunks).not.toContain('sRGB');
    }
  });

  it('P3 orange (255,120,0) and red are no longer clipped to sRGB (the issue measured 255,110,0 and 255,1,3)', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/p3.jpg?width=64&format=png' });
    const [orange, red] = await quadrantCodes(res.rawPayload);
    within([orange, red], [[255, 120, 0], [255, 0, 0]], 1);
  });

  it('gamut=srgb converts as lcms does, within one code where the colour is in gamut', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/p3.jpg?width=64&format=png&gamut=srgb' });
    expect(res.statusCode).toBe(200);
    expect(pngChunkTypes(res.rawPayload)).toContain('sRGB');
    const [, , tan, grey] = await quadrantCodes(res.rawPayload);
    // lcms's conversion of the source itself (sharp converts an embedded profile to sRGB).
    const [, , lcmsTan, lcmsGrey] = await quadrantCodes(await sharp(source).withIccProfile('srgb').png().toBuffer());
    within([tan, grey], [lcmsTan, lcmsGrey], 1);
    // And the published matrices (SMPTE RP 177 from EG 432-1 and IEC 61966-2-1 primaries) agree.
    const stored = (await quadrantCodes(source))[2];
    within([tan], [p3ToSrgb(stored.map((v) => v / 255)).map((v) => Math.round(v * 255))], 1);
  });

  it('gamut is in the cache key and the ETag: srgb differs; p3 and rec2020 are the same rendition as source', async () => {
    const etag = async (q: string) => (await t.app.inject({ url: `/v1/renditions/p3.jpg?width=64&format=webp${q}` })).headers.etag;
    const [source, srgb, p3, rec2020] = await Promise.all(['', '&gamut=srgb', '&gamut=p3', '&gamut=rec2020'].map(etag));
    expect(srgb).not.toBe(source);
    expect(p3).toBe(source);
    expect(rec2020).toBe(source);
  });

  it('refuses a gamut it does not know, naming the values', async () => {
    const res = await t.app.inject({ url: '/v1/renditions/p3.jpg?width=64&gamut=adobe' });
    expect(res.statusCode).toBe(400);
    expect(res.json().detail).toContain('source, srgb, p3, rec2020');
  });
});
