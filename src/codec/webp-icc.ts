/**
 * Drops the ICC profile from a WebP file without re-encoding (RFC 9649, the WebP container:
 * RIFF chunks, each a FourCC, a little-endian 32-bit size and the payload padded to even
 * length; VP8X's first byte holds the feature flags, ICC = 0x20). For tiny inline images
 * (the manifest placeholder) the sRGB profile would be most of the bytes, and an untagged
 * image is taken as sRGB by browsers anyway (CSS Color 4: untagged images are sRGB; from memory).
 * Without other features (alpha, metadata, animation) the simple format remains: RIFF + VP8.
 */
const ICC_FLAG = 0x20;

function fourcc(b: Buffer, at: number): string {
  return b.toString('latin1', at, at + 4);
}

/** The same picture without its ICCP chunk; the input unchanged when it has none. */
export function webpWithoutIcc(webp: Buffer): Buffer {
  if (webp.length < 12 || fourcc(webp, 0) !== 'RIFF' || fourcc(webp, 8) !== 'WEBP') throw new RangeError('not a WebP file');
  const chunks: { id: string; bytes: Buffer }[] = [];
  for (let at = 12; at + 8 <= webp.length; ) {
    const size = webp.readUInt32LE(at + 4);
    const end = Math.min(webp.length, at + 8 + size + (size & 1));
    chunks.push({ id: fourcc(webp, at), bytes: webp.subarray(at, end) });
    at = end;
  }
  const vp8x = chunks.find((c) => c.id === 'VP8X');
  if (!vp8x || !chunks.some((c) => c.id === 'ICCP')) return webp;
  const flags = vp8x.bytes[8] & ~ICC_FLAG;
  const kept = chunks
    .filter((c) => c.id !== 'ICCP' && !(c.id === 'VP8X' && flags === 0))
    .map((c) => (c.id === 'VP8X' ? { ...c, bytes: Buffer.concat([c.bytes.subarray(0, 8), Buffer.from([flags]), c.bytes.subarray(9)]) } : c));
  const body = Buffer.concat(kept.map((c) => c.bytes));
  const head = Buffer.alloc(12);
  head.write('RIFF', 0, 'latin1');
  head.writeUInt32LE(4 + body.length, 4);
  head.write('WEBP', 8, 'latin1');
  return Buffer.concat([head, body]);
}
