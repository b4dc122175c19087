import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { build, type TestApp } from '../helpers/build.js';
import { png, upload } from './fixtures.js';

// The sRGB transfer function written out here from IEC 61966-2-1:1999 (CHECKS.md), so the
// expected means do not come from the code under test.
const toLight = (code: number) => (code / 255 <= 0.04045 ? code / 255 / 12.92 : ((code / 255 + 0.055) / 1.055) ** 2.4);
const toCode = (l: number) => Math.round(255 * (l <= 0.0031308 ? 12.92 * l : 1.055 * l ** (1 / 2.4) - 0.055));

/** Per-channel linear-light mean of 8-bit RGB(A) pixels, as codes. */
function lightMean(data: Buffer, channels: number): number[] {
  const sums = [0, 0, 0];
  for (let i = 0; i < data.length; i += channels) for (let c = 0; c < 3; c++) sums[c] += toLight(data[i + c]);
  return sums.map((s) => toCode(s / (data.length / channels)));
}

const hexCodes = (hex: string) => [1, 3, 5].map((i) => Number.parseInt(hex.slice(i, i + 2), 16));

async function decodeDataUri(uri: string) {
  const m = /^data:image\/webp;base64,([A-Za-z0-9+/=]+)$/.exec(uri);
  expect(m, uri.slice(0, 40)).not.toBeNull();
  const bytes = Buffer.from(m![1], 'base64');
  const { data, info } = await sharp(bytes).raw().toBuffer({ resolveWithObject: true });
  return { bytes, data, info };
}

describe('the manifest placeholder', () => {
  let t: TestApp;
  // Four flat quadrants of saturated colours and a diagonal ramp: a mean far from grey and
  // far from the mean of the codes.
  const quadrants = (x: number, y: number) =>
    x < 150 ? (y < 100 ? [255, 0, 0] : [0, 0, 255]) : y < 100 ? [0, 255, 0] : [Math.round((255 * x) / 299), 255, Math.round((255 * y) / 199)];
  let sourceBytes: Buffer;

  beforeAll(async () => {
    t = await build();
    sourceBytes = await png(300, 200, quadrants);
  });
  afterAll(() => t?.close());

  it('carries the linear-light mean colour within one code of the source', async () => {
    const m = (await upload(t.app, sourceBytes, '?widths=160')).json();
    const { data, info } = await sharp(sourceBytes).raw().toBuffer({ resolveWithObject: true });
    const expected = lightMean(data, info.channels);
    hexCodes(m.placeholder.mean).forEach((v, c) => expect(Math.abs(v - expected[c])).toBeLessThanOrEqual(1));
  });

  it('is a WebP data URI 32 px wide of a few hundred bytes whose own mean is the source mean', async () => {
    const { placeholder } = (await upload(t.app, sourceBytes, '?widths=160')).json();
    const { bytes, data, info } = await decodeDataUri(placeholder.dataUri);
    expect([info.width, info.height]).toEqual([32, 21]); // 32 x 200/300 = 21.3
    expect([placeholder.width, placeholder.height, placeholder.bytes]).toEqual([32, 21, bytes.length]);
    expect(bytes.length).toBeLessThan(600);
    // Lossy WebP (4:2:0 chroma) moves a saturated mean by a few codes; within 6 of the source.
    const own = lightMean(data, info.channels);
    hexCodes(placeholder.mean).forEach((v, c) => expect(Math.abs(v - own[c])).toBeLessThanOrEqual(6));
  });

  it('does not alias: 1 px stripes become their linear-light grey, 188, not 128 or false bars', async () => {
    // 1-px black/white stripes average to linear 0.5 = code 188 (CHECKS.md, IEC 61966-2-1).
    const stripes = await png(320, 200, (x) => (x % 2 ? [255, 255, 255] : [0, 0, 0]));
    const { placeholder } = (await upload(t.app, stripes, '?widths=160')).json();
    expect(placeholder.mean).toBe('#bcbcbc');
    const { data } = await decodeDataUri(placeholder.dataUri);
    for (const v of data) expect(Math.abs(v - 188)).toBeLessThanOrEqual(3);
  });

  it('shows in htmlWithPlaceholder under the image, mean colour first', async () => {
    const m = (await upload(t.app, sourceBytes, '?widths=160')).json();
    expect(m.htmlWithPlaceholder).toContain(`style="max-width:100%;height:auto;background:${m.placeholder.mean} url(${m.placeholder.dataUri}) 0 0/100% 100% no-repeat"`);
    expect(m.html).not.toContain('data:');
  });

  it('gives a transparent picture no placeholder under it (it would show through)', async () => {
    const rgba = await sharp(Buffer.alloc(64 * 40 * 4, 128), { raw: { width: 64, height: 40, channels: 4 } }).png().toBuffer();
    const m = (await upload(t.app, rgba, '?widths=32')).json();
    expect(m.htmlWithPlaceholder).toBe(m.html);
    expect(m.placeholder.mean).toBe('#808080');
  });

  it('takes sizes from the query, and refuses markup in it', async () => {
    const sizes = '(max-width: 600px) 100vw, 600px';
    const m = (await upload(t.app, sourceBytes, `?widths=160&sizes=${encodeURIComponent(sizes)}`)).json();
    expect(m.sizes).toBe(sizes);
    expect(m.html.match(/sizes="([^"]*)"/g)).toEqual([`sizes="${sizes}"`, `sizes="${sizes}"`]);
    const bad = await upload(t.app, sourceBytes, `?widths=160&sizes=${encodeURIComponent('100vw"><script>')}`);
    expect(bad.statusCode).toBe(400);
    expect(bad.json().detail).toContain('sizes must be an HTML sizes value');
  });
});
