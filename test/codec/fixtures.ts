/** Test inputs for the codec tests: PNG chunk surgery and colorimetry from published numbers. */
import { deflateSync } from 'node:zlib';
import sharp from 'sharp';
import { pngChunk } from '../../src/codec/png-srgb.js';

const ihdrEnd = 8 + 4 + 4 + 13 + 4;

/** Chunk types of a PNG stream, in order (W3C PNG Specification, Third Edition, §5.3). */
export function pngChunkTypes(png: Buffer): string[] {
  const types: string[] = [];
  for (let at = 8; at + 8 <= png.length; ) {
    const length = png.readUInt32BE(at);
    types.push(png.toString('latin1', at + 4, at + 8));
    at += 12 + length;
  }
  return types;
}

/** Embeds `icc` as an iCCP chunk (PNG spec §11.3.2.4) without touching the samples. */
export function withIccChunk(png: Buffer, icc: Buffer): Buffer {
  const name = Buffer.from('test profile\0\0', 'latin1'); // name, NUL, compression method 0
  const chunk = pngChunk('iCCP', Buffer.concat([name, deflateSync(icc)]));
  return Buffer.concat([png.subarray(0, ihdrEnd), chunk, png.subarray(ihdrEnd)]);
}

/** Rewrites the size in a PNG's IHDR (and its CRC), leaving the image data as it was. */
export function withHeaderSize(png: Buffer, width: number, height: number): Buffer {
  const ihdr = Buffer.from(png.subarray(16, 29));
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  return Buffer.concat([png.subarray(0, 8), pngChunk('IHDR', ihdr), png.subarray(ihdrEnd)]);
}

/** sharp's built-in Display P3 profile, taken from an output it tagged. */
export async function displayP3Profile(): Promise<Buffer> {
  const tagged = await sharp(new Uint16Array(3), { raw: { width: 1, height: 1, channels: 3 } })
    .toColourspace('rgb16')
    .withIccProfile('p3')
    .png()
    .toBuffer();
  const icc = (await sharp(tagged).metadata()).icc;
  if (!icc) throw new Error('sharp attached no P3 profile');
  return icc;
}

// sRGB transfer function, IEC 61966-2-1:1999 (see CHECKS.md). Display P3 uses the same curve
// (Apple, "Display P3" colour space: DCI-P3 primaries, D65 white, sRGB transfer function).
export const srgbToLinear = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
export const linearToSrgb = (l: number) => (l <= 0.0031308 ? 12.92 * l : 1.055 * l ** (1 / 2.4) - 0.055);

type Xy = readonly [number, number];
type M3 = number[][];

/** RGB -> XYZ from chromaticities (SMPTE RP 177-1993, §3.3). */
function rgbToXyz(r: Xy, g: Xy, b: Xy, w: Xy): M3 {
  const col = ([x, y]: Xy) => [x / y, 1, (1 - x - y) / y];
  const P = [col(r), col(g), col(b)];
  const m = [0, 1, 2].map((i) => [P[0][i], P[1][i], P[2][i]]);
  const W = col(w);
  const S = mul(invert(m), [[W[0]], [W[1]], [W[2]]]).map((row) => row[0]);
  return m.map((row) => row.map((v, j) => v * S[j]));
}

function mul(a: M3, b: M3): M3 {
  return a.map((row) => b[0].map((_, j) => row.reduce((s, v, k) => s + v * b[k][j], 0)));
}

function invert(m: M3): M3 {
  const [[a, b, c], [d, e, f], [g, h, i]] = m;
  const det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g);
  return [
    [(e * i - f * h) / det, (c * h - b * i) / det, (b * f - c * e) / det],
    [(f * g - d * i) / det, (a * i - c * g) / det, (c * d - a * f) / det],
    [(d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det],
  ];
}

const d65: Xy = [0.3127, 0.329];
// sRGB primaries: IEC 61966-2-1:1999 (= ITU-R BT.709-6). Display P3 primaries: SMPTE EG
// 432-1:2010 (DCI-P3) with the D65 white point.
const srgbPrimaries = rgbToXyz([0.64, 0.33], [0.3, 0.6], [0.15, 0.06], d65);
const p3Primaries = rgbToXyz([0.68, 0.32], [0.265, 0.69], [0.15, 0.06], d65);
const p3ToSrgbLinear = mul(invert(srgbPrimaries), p3Primaries);

/** Encoded Display P3 (0..1) -> encoded sRGB (0..1), unclipped. */
export function p3ToSrgb(rgb: readonly number[]): number[] {
  const lin = rgb.map(srgbToLinear);
  return p3ToSrgbLinear.map((row) => linearToSrgb(row.reduce((s, v, k) => s + v * lin[k], 0)));
}
