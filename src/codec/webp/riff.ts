/**
 * The WebP container (Google's "WebP Container Specification", RIFF based): the chunks must
 * tile the RIFF payload exactly (each chunk an 8-byte header, its payload and a pad byte when
 * the payload is odd, per the RIFF rules the specification adopts); the simple formats hold one
 * "VP8 " or "VP8L" chunk, the extended one a "VP8X" chunk first, then either one image (an
 * optional "ALPH" before "VP8 ", or "VP8L") or, when animated, "ANIM" and "ANMF" frames, each
 * with its own image chunks. Returns the image bitstreams with the size each must have.
 * Field layouts (VP8X flags and 24-bit canvas size minus one, ANMF's 16-byte frame header)
 * are from memory of the specification; the checks are what it says a file must be.
 */
import { WebpDamage } from './damage.js';

export interface Chunk {
  fourcc: string;
  /** The payload (without header and pad byte). */
  data: Uint8Array;
}

export interface WebpImage {
  /** The "VP8 " or "VP8L" chunk. */
  bitstream: Chunk;
  /** The "ALPH" chunk before a "VP8 " one, if any. */
  alpha?: Chunk;
  width: number;
  height: number;
}

const u24 = (b: Uint8Array, at: number): number => b[at] | (b[at + 1] << 8) | (b[at + 2] << 16);
const u32 = (b: Uint8Array, at: number): number => (b[at] | (b[at + 1] << 8) | (b[at + 2] << 16) | (b[at + 3] << 24)) >>> 0;
const fourcc = (b: Uint8Array, at: number): string => String.fromCharCode(b[at], b[at + 1], b[at + 2], b[at + 3]);

/** Splits [start, end) into chunks; they must fill it exactly. */
export function chunks(b: Uint8Array, start: number, end: number): Chunk[] {
  const out: Chunk[] = [];
  let at = start;
  while (at < end) {
    if (at + 8 > end) throw new WebpDamage(`a chunk header at byte ${at} is cut short`);
    const size = u32(b, at + 4);
    const next = at + 8 + size + (size & 1);
    if (at + 8 + size > end) throw new WebpDamage(`chunk "${fourcc(b, at)}" at byte ${at} (${size} bytes) runs past its container`);
    out.push({ fourcc: fourcc(b, at), data: b.subarray(at + 8, at + 8 + size) });
    // The last chunk's pad byte may be all that is left; nothing else may follow it.
    at = Math.min(next, end);
  }
  return out;
}

/** The RIFF header: "RIFF", the payload size, "WEBP"; the file ends where the size says. */
export function riffChunks(b: Uint8Array): Chunk[] {
  if (b.length < 12 || fourcc(b, 0) !== 'RIFF' || fourcc(b, 8) !== 'WEBP') throw new WebpDamage('not a RIFF/WEBP file');
  const size = u32(b, 4);
  if (8 + size > b.length) throw new WebpDamage(`the file is cut short: RIFF says ${8 + size} bytes, there are ${b.length}`);
  if (8 + size + (size & 1) < b.length) throw new WebpDamage(`${b.length - 8 - size} bytes follow the end of the RIFF container`);
  return chunks(b, 12, 8 + size);
}

function imageOf(list: Chunk[], where: string): Omit<WebpImage, 'width' | 'height'> {
  const at = list.findIndex((c) => c.fourcc === 'VP8 ' || c.fourcc === 'VP8L');
  if (at < 0) throw new WebpDamage(`${where} holds no VP8 or VP8L image`);
  if (list.slice(at + 1).some((c) => c.fourcc === 'VP8 ' || c.fourcc === 'VP8L' || c.fourcc === 'ALPH')) {
    throw new WebpDamage(`${where} holds more than one image`);
  }
  const alphaAt = list.findIndex((c) => c.fourcc === 'ALPH');
  if (alphaAt >= 0 && (alphaAt > at || list[at].fourcc !== 'VP8 ')) throw new WebpDamage(`${where}: an ALPH chunk must come before a VP8 image`);
  return { bitstream: list[at], alpha: alphaAt >= 0 ? list[alphaAt] : undefined };
}

/** The images of a WebP file, each with the size its container gives it. */
export function webpImages(b: Uint8Array): { images: WebpImage[]; extended: boolean } {
  const list = riffChunks(b);
  if (list.length === 0) throw new WebpDamage('the RIFF container is empty');
  if (list[0].fourcc !== 'VP8X') {
    // Simple format: the image chunk alone; its own header gives the size (width 0 = unknown).
    if (list.length !== 1) throw new WebpDamage('a simple WebP holds exactly one image chunk');
    return { images: [{ ...imageOf(list, 'the file'), width: 0, height: 0 }], extended: false };
  }
  const x = list[0].data;
  if (x.length !== 10) throw new WebpDamage(`the VP8X chunk has ${x.length} bytes, not 10`);
  const animated = (x[0] & 0x02) !== 0;
  const canvasW = 1 + u24(x, 4);
  const canvasH = 1 + u24(x, 7);
  const rest = list.slice(1);
  if (!animated) return { images: [{ ...imageOf(rest, 'the file'), width: canvasW, height: canvasH }], extended: true };
  if (!rest.some((c) => c.fourcc === 'ANIM' && c.data.length === 6)) throw new WebpDamage('an animated WebP has no 6-byte ANIM chunk');
  const frames = rest.filter((c) => c.fourcc === 'ANMF');
  if (frames.length === 0) throw new WebpDamage('an animated WebP has no frame');
  const images = frames.map((f, i) => {
    if (f.data.length < 16) throw new WebpDamage(`frame ${i} is shorter than its 16-byte header`);
    const [fx, fy, fw, fh] = [2 * u24(f.data, 0), 2 * u24(f.data, 3), 1 + u24(f.data, 6), 1 + u24(f.data, 9)];
    if (fx + fw > canvasW || fy + fh > canvasH) throw new WebpDamage(`frame ${i} (${fw}x${fh} at ${fx},${fy}) is not inside the ${canvasW}x${canvasH} canvas`);
    const inner = chunks(f.data, 16, f.data.length);
    return { ...imageOf(inner, `frame ${i}`), width: fw, height: fh };
  });
  return { images, extended: true };
}
