/**
 * Whether a GIF data stream is whole: its blocks walked as GIF89a lays them out (header, logical
 * screen descriptor and global colour table; then extensions 0x21, images 0x2C, each ending in
 * data sub-blocks, up to the trailer 0x3B). libvips' GIF loader shows a stream cut short as an
 * animation with fewer or partly drawn frames, and warns about nothing (measured with sharp
 * 0.35), so a cut GIF would be rendered and cached as if it were the picture.
 */

/** The offset after the data sub-blocks starting at `at` (each a length byte, 0 ends them), or -1. */
function skipSubBlocks(b: Uint8Array, at: number): number {
  while (at < b.length) {
    const n = b[at];
    if (n === 0) return at + 1;
    at += 1 + n;
  }
  return -1;
}

/** The size in bytes of a colour table that `packed`'s flag announces (GIF89a §18, §20), else 0. */
function tableBytes(packed: number): number {
  return packed & 0x80 ? 3 * (1 << ((packed & 0x07) + 1)) : 0;
}

/** True when `b` is a GIF stream that reaches its trailer; false when it ends before. */
export function gifReachesTrailer(b: Uint8Array): boolean {
  if (b.length < 13) return false;
  let at = 13 + tableBytes(b[10]);
  while (at < b.length) {
    const kind = b[at];
    if (kind === 0x3b) return true;
    if (kind === 0x21) {
      at = skipSubBlocks(b, at + 2);
    } else if (kind === 0x2c) {
      if (at + 10 > b.length) return false;
      // Descriptor (10 bytes with the separator), local table, LZW minimum code size, data.
      at = skipSubBlocks(b, at + 10 + tableBytes(b[at + 9]) + 1);
    } else {
      return false;
    }
    if (at < 0) return false;
  }
  return false;
}
