/**
 * The VP8 key frame inside a WebP "VP8 " chunk: the uncompressed data chunk of RFC 6386 §9.1
 * (§19.1) and the partition layout of §9.5, each checked against the chunk that holds it.
 */
import { WebpDamage } from './damage.js';

export interface Vp8Frame {
  width: number;
  height: number;
  /** The first partition (frame header and per-macroblock modes): [start, end) in the chunk. */
  first: [number, number];
  /** The DCT token partitions, 1, 2, 4 or 8 of them, in order. */
  tokens: Array<[number, number]>;
}

/** §9.1: the 3-byte frame tag, the start code 9d 01 2a, then 14-bit width and height. */
export function readFrameTag(chunk: Uint8Array): Omit<Vp8Frame, 'tokens'> {
  if (chunk.length < 10) throw new WebpDamage('the VP8 frame is shorter than its 10-byte header');
  const tag = chunk[0] | (chunk[1] << 8) | (chunk[2] << 16);
  // key_frame is 0 for a key frame; a WebP holds exactly one, shown (show_frame = 1).
  if ((tag & 1) !== 0) throw new WebpDamage('the VP8 frame is not a key frame');
  if (((tag >> 1) & 7) > 3) throw new WebpDamage('the VP8 version is not 0 to 3');
  if (((tag >> 4) & 1) !== 1) throw new WebpDamage('the VP8 frame is not shown');
  const firstSize = tag >>> 5;
  if (chunk[3] !== 0x9d || chunk[4] !== 0x01 || chunk[5] !== 0x2a) throw new WebpDamage('the VP8 start code 9d 01 2a is missing');
  // Two high bits of each are an upscaling hint (§9.1), not part of the size.
  const width = (chunk[6] | (chunk[7] << 8)) & 0x3fff;
  const height = (chunk[8] | (chunk[9] << 8)) & 0x3fff;
  if (width === 0 || height === 0) throw new WebpDamage('the VP8 frame has no size');
  if (10 + firstSize > chunk.length) throw new WebpDamage(`the first VP8 partition (${firstSize} bytes) runs past its chunk`);
  return { width, height, first: [10, 10 + firstSize] };
}

/**
 * §9.5: after the first partition, (count - 1) 3-byte little-endian sizes, then the token
 * partitions back to back; the last one takes what is left of the chunk.
 */
export function tokenPartitions(chunk: Uint8Array, firstEnd: number, count: number): Array<[number, number]> {
  const table = firstEnd;
  let at = table + 3 * (count - 1);
  if (at > chunk.length) throw new WebpDamage('the VP8 partition size table runs past its chunk');
  const parts: Array<[number, number]> = [];
  for (let p = 0; p < count - 1; p++) {
    const o = table + 3 * p;
    const size = chunk[o] | (chunk[o + 1] << 8) | (chunk[o + 2] << 16);
    if (at + size > chunk.length) throw new WebpDamage(`VP8 token partition ${p} runs past its chunk`);
    parts.push([at, at + size]);
    at += size;
  }
  if (at >= chunk.length) throw new WebpDamage('the last VP8 token partition is empty');
  parts.push([at, chunk.length]);
  return parts;
}
