/**
 * The sRGB tag of a JPEG, attached without a colour transform. sharp's withIccProfile('srgb')
 * runs the raster through an sRGB -> sRGB transform (an identity: every 8-bit code comes back
 * unchanged) before it writes the profile as an APP2 segment right after SOI; the transform
 * alone took 4.6 ms of a 12.4 ms encode of an 800 x 533 rendition. Here the profile segment is
 * taken once from sharp's own output, and each rendition encoded untagged gets it spliced in at
 * the same place: the same bytes, to the byte (test/codec/jpeg-icc.test.ts).
 */
import sharp from 'sharp';

const SOI = 0xd8;
const APP2 = 0xe2;
const SOS = 0xda;

let segment: Promise<Buffer> | undefined;

/** The APP2 segment(s) (marker, length, payload) sharp writes for its sRGB profile. */
export function srgbSegment(): Promise<Buffer> {
  segment ??= sharp(Buffer.alloc(8 * 8 * 3, 128), { raw: { width: 8, height: 8, channels: 3 } })
    .withIccProfile('srgb')
    .jpeg()
    .toBuffer()
    .then(iccSegments);
  segment.catch(() => (segment = undefined));
  return segment;
}

/** The APP2 segments of a JPEG's header, concatenated as they stand (empty when it has none). */
export function iccSegments(jpeg: Buffer): Buffer {
  if (jpeg[0] !== 0xff || jpeg[1] !== SOI) throw new RangeError('not a JPEG file');
  const parts: Buffer[] = [];
  for (let at = 2; at + 4 <= jpeg.length && jpeg[at] === 0xff; ) {
    const marker = jpeg[at + 1];
    if (marker === SOS) break;
    const end = at + 2 + jpeg.readUInt16BE(at + 2);
    if (marker === APP2) parts.push(jpeg.subarray(at, end));
    at = end;
  }
  return Buffer.concat(parts);
}

/** `jpeg` (untagged) with the sRGB profile's segment after its SOI, where sharp puts it. */
export async function tagJpegSrgb(jpeg: Buffer): Promise<Buffer> {
  if (jpeg[0] !== 0xff || jpeg[1] !== SOI) throw new RangeError('not a JPEG file');
  const app2 = await srgbSegment();
  return Buffer.concat([jpeg.subarray(0, 2), app2, jpeg.subarray(2)]);
}
