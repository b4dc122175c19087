import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { adobeRgbDecode, adobeRgbSpace, displayP3Space, rgbToRgb, srgbSpace } from '../../src/core/color/index.js';
import { srgbEncode } from '../../src/core/color/srgb.js';
import { isWideGamutProfile } from '../../src/codec/icc.js';
import { build, type TestApp } from '../helpers/build.js';
import { adobeRgbProfile, withIccChunk } from '../codec/fixtures.js';

// An Adobe RGB (1998) source (profile built from its specification, fixtures.ts): lcms, through
// sharp, linearises its gamma-563/256 codes and converts them to Display P3; the answer must
// match the published formulas (the spec's curve, SMPTE RP 177 matrices from the primaries)
// within one code; two below code 64, where a code is a larger step of linear light and
// lcms's 8-bit transform measured 57 for the formula's 59 (orange's blue in P3).

const colours = [
  [200, 100, 50],
  [100, 150, 120],
  [128, 128, 128],
  [90, 60, 200],
];
const side = 64;

/** Expected codes of an Adobe RGB colour in `to` (sRGB's curve for both P3 and sRGB). */
function expected(adobe: number[], to: typeof srgbSpace): number[] {
  const lin = adobe.map((c) => adobeRgbDecode(c / 255));
  const m = rgbToRgb(adobeRgbSpace, to);
  return [0, 1, 2].map((r) => Math.round(255 * srgbEncode(m[3 * r] * lin[0] + m[3 * r + 1] * lin[1] + m[3 * r + 2] * lin[2])));
}

describe('an Adobe RGB (1998) source', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await build();
    const data = new Uint8Array(side * side * 3);
    for (let y = 0; y < side; y++) for (let x = 0; x < side; x++) data.set(colours[(y < side / 2 ? 0 : 2) + (x < side / 2 ? 0 : 1)], (y * side + x) * 3);
    const png = await sharp(data, { raw: { width: side, height: side, channels: 3 } }).png().toBuffer();
    await writeFile(join(t.sourceDir, 'adobe.png'), withIccChunk(png, adobeRgbProfile()));
  });
  afterAll(() => t.close());

  it('counts as wide gamut', () => {
    expect(isWideGamutProfile(adobeRgbProfile())).toBe(true);
  });

  it.each([
    ['source', displayP3Space],
    ['srgb', srgbSpace],
  ] as const)('gamut=%s: each colour within one code of the published formulas', async (gamut, space) => {
    const res = await t.app.inject({ url: `/v1/renditions/adobe.png?width=16&format=png&gamut=${gamut}` });
    expect(res.statusCode).toBe(200);
    const { data } = await sharp(res.rawPayload, { ignoreIcc: true }).raw().toBuffer({ resolveWithObject: true });
    const at = (x: number, y: number) => Array.from(data.subarray((y * 16 + x) * 3, (y * 16 + x) * 3 + 3));
    const got = [at(4, 4), at(12, 4), at(4, 12), at(12, 12)];
    got.forEach((px, i) => {
      const want = expected(colours[i], space);
      px.forEach((v, c) => expect(Math.abs(v - want[c]), `colour ${i} channel ${c}: ${v} vs ${want[c]}`).toBeLessThanOrEqual(want[c] < 64 ? 2 : 1));
    });
  });
});
