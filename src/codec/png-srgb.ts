/**
 * Tags a PNG as sRGB with the PNG `sRGB` chunk (W3C PNG Specification, Third Edition,
 * §11.3.2.5 "sRGB Standard RGB colour space"): one byte of rendering intent, placed before
 * PLTE and IDAT. It is valid for greyscale and 16-bit images alike, which an RGB ICC profile
 * is not (a grey PNG may only embed a grey profile).
 */

const signatureLength = 8;
const ihdrEnd = signatureLength + 4 + 4 + 13 + 4; // length, type, IHDR data, CRC
/** Rendering intent 0 = perceptual (PNG spec §11.3.2.5). */
const perceptual = 0;

const crcTable = (() => {
  // CRC-32 of ISO 3309 / ITU-T V.42, polynomial 0xedb88320 (PNG spec §5.5, Annex D).
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (let i = 0; i < bytes.length; i++) c = crcTable[(c ^ bytes[i]) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** Builds one PNG chunk: length, type, data, CRC over type and data. */
export function pngChunk(type: string, data: Uint8Array): Buffer {
  const chunk = Buffer.alloc(12 + data.length);
  chunk.writeUInt32BE(data.length, 0);
  chunk.write(type, 4, 'latin1');
  chunk.set(data, 8);
  chunk.writeUInt32BE(crc32(chunk.subarray(4, 8 + data.length)), 8 + data.length);
  return chunk;
}

/** Returns the PNG with an sRGB chunk right after IHDR; throws if `png` is not a PNG. */
export function tagPngSrgb(png: Buffer): Buffer {
  if (png.length < ihdrEnd || png.toString('latin1', 12, 16) !== 'IHDR') {
    throw new RangeError('Not a PNG stream.');
  }
  const srgb = pngChunk('sRGB', Uint8Array.of(perceptual));
  return Buffer.concat([png.subarray(0, ihdrEnd), srgb, png.subarray(ihdrEnd)]);
}
