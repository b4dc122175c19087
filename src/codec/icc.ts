/**
 * What an embedded ICC profile says about a source's gamut, read from its bytes (ICC.1:2022,
 * §7.2 header, §7.3 tag table, §10.31 XYZType). Only the three colorant tags of a
 * matrix/shaper RGB profile are read: the conversion itself is lcms's (through sharp).
 */

/** sRGB's colorants as the ICC sRGB profile stores them, adapted to D50 (Bradford; from memory). */
const srgbColorants = [
  [0.4361, 0.2225, 0.0139],
  [0.3851, 0.7169, 0.0971],
  [0.1431, 0.0606, 0.7141],
];

/** A gamut this much larger than sRGB's (area in xy) counts as wide; rounding in profiles is far below it. */
const wideAreaRatio = 1.05;

function colorant(icc: Buffer, tag: string): [number, number, number] | undefined {
  if (icc.length < 132) return undefined;
  const count = icc.readUInt32BE(128);
  for (let i = 0; i < count && 132 + 12 * (i + 1) <= icc.length; i++) {
    const at = 132 + 12 * i;
    if (icc.toString('latin1', at, at + 4) !== tag) continue;
    const offset = icc.readUInt32BE(at + 4);
    if (offset + 20 > icc.length || icc.toString('latin1', offset, offset + 4) !== 'XYZ ') return undefined;
    // s15Fixed16Number (ICC.1 §4.6).
    return [0, 1, 2].map((k) => icc.readInt32BE(offset + 8 + 4 * k) / 65536) as [number, number, number];
  }
  return undefined;
}

function area(xyz: number[][]): number {
  const xy = xyz.map(([X, Y, Z]) => [X / (X + Y + Z), Y / (X + Y + Z)]);
  const [a, b, c] = xy;
  return Math.abs((b[0] - a[0]) * (c[1] - a[1]) - (c[0] - a[0]) * (b[1] - a[1])) / 2;
}

/**
 * True when `icc` is an RGB matrix/shaper profile whose primaries span a gamut wider than
 * sRGB's (Display P3, Adobe RGB (1998), ProPhoto RGB, Rec. 2020). Profiles without colorant
 * tags (LUT-based, grey, CMYK) answer false: those sources are converted to sRGB as before.
 */
export function isWideGamutProfile(icc: Buffer | undefined): boolean {
  if (!icc || icc.length < 132 || icc.toString('latin1', 16, 20) !== 'RGB ') return false;
  const xyz = ['rXYZ', 'gXYZ', 'bXYZ'].map((t) => colorant(icc, t));
  if (xyz.some((c) => c === undefined || !(c[0] + c[1] + c[2] > 0))) return false;
  return area(xyz as number[][]) > wideAreaRatio * area(srgbColorants);
}
