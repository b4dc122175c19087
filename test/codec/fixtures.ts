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

/**
 * An ICC v2 display profile of Adobe RGB (1998) built from its specification alone: the
 * RGB-to-XYZ matrix of §4.3.4.1 (D65) adapted to the ICC's D50 connection space with the
 * Bradford transform (ICC.1 Annex E; matrix from memory), and the transfer function 563/256,
 * which a `curv` gamma (u8Fixed8Number) holds exactly. Tags: desc, wtpt, rXYZ/gXYZ/bXYZ,
 * rTRC/gTRC/bTRC (ICC.1 §9.2, matrix/TRC model).
 */
export function adobeRgbProfile(): Buffer {
  const m = [
    [0.57667, 0.18556, 0.18823],
    [0.29734, 0.62736, 0.07529],
    [0.02703, 0.07069, 0.99134],
  ];
  const bradford = [
    [0.8951, 0.2664, -0.1614],
    [-0.7502, 1.7135, 0.0367],
    [0.0389, -0.0685, 1.0296],
  ];
  const d65 = [0.95047, 1, 1.08883];
  const d50 = [0.96422, 1, 0.82521];
  const cone = (w: number[]) => bradford.map((row) => row.reduce((s, v, k) => s + v * w[k], 0));
  const [s65, s50] = [cone(d65), cone(d50)];
  const adapt = mul(mul(invert(bradford), s50.map((v, i) => [0, 1, 2].map((j) => (i === j ? v / s65[i] : 0)))), bradford);
  const d50m = mul(adapt, m);
  const xyz = (v: number[]) => {
    const b = Buffer.alloc(20);
    b.write('XYZ ', 0, 'latin1');
    v.forEach((x, k) => b.writeInt32BE(Math.round(x * 65536), 8 + 4 * k));
    return b;
  };
  const curv = Buffer.from([0x63, 0x75, 0x72, 0x76, 0, 0, 0, 0, 0, 0, 0, 1, 0x02, 0x33, 0, 0]); // gamma 563/256
  const text = 'Adobe RGB (1998) test profile';
  const desc = Buffer.alloc(12 + text.length + 1 + 8 + 3 + 67);
  desc.write('desc', 0, 'latin1');
  desc.writeUInt32BE(text.length + 1, 8);
  desc.write(text, 12, 'latin1');
  const col = (j: number) => xyz([0, 1, 2].map((i) => d50m[i][j]));
  const tags: [string, Buffer][] = [
    ['desc', desc], ['wtpt', xyz(d50)], ['rXYZ', col(0)], ['gXYZ', col(1)], ['bXYZ', col(2)],
    ['rTRC', curv], ['gTRC', curv], ['bTRC', curv],
  ];
  const tableEnd = 128 + 4 + 12 * tags.length;
  let at = tableEnd;
  const table = Buffer.alloc(4 + 12 * tags.length);
  table.writeUInt32BE(tags.length, 0);
  const bodies: Buffer[] = [];
  tags.forEach(([sig, data], i) => {
    const padded = Buffer.concat([data, Buffer.alloc((4 - (data.length % 4)) % 4)]);
    table.write(sig, 4 + 12 * i, 'latin1');
    table.writeUInt32BE(at, 8 + 12 * i);
    table.writeUInt32BE(data.length, 12 + 12 * i);
    bodies.push(padded);
    at += padded.length;
  });
  const header = Buffer.alloc(128);
  header.writeUInt32BE(at, 0);
  header.writeUInt32BE(0x02100000, 8); // version 2.1
  header.write('mntrRGB XYZ ', 12, 'latin1');
  header.write('acsp', 36, 'latin1');
  d50.forEach((v, k) => header.writeInt32BE(Math.round(v * 65536), 68 + 4 * k)); // PCS illuminant
  return Buffer.concat([header, table, ...bodies]);
}
