/**
 * Our own check of a WebP's bitstream, before libwebp decodes it: libwebp's VP8 decoder has no
 * checksum to catch damaged data, and decodes bytes flipped inside the DCT tokens into a
 * garbled picture without any error. The check walks the container (riff.ts), the headers of
 * each image, and reads every VP8 partition to its end with a boolean decoder (vp8-parse.ts):
 * a decoder that lost step with the encoder runs past its partition's end or stops far short
 * of it. VP8L (lossless) and ALPH data are checked up to their headers only: libwebp's
 * lossless decoder refuses most damage itself.
 */
import { WebpDamage } from './damage.js';
import { type PartitionEnd, parseVp8 } from './vp8-parse.js';
import { type WebpImage, webpImages } from './riff.js';

export { WebpDamage } from './damage.js';

/**
 * How far a valid partition's decoder may stop from its end. Measured with libwebp's encoder
 * (through sharp, test/codec/webp-check.test.ts): at most 2 bytes unread, none read past the end, and the eight bools after
 * the last symbol all 0 (the encoder flushes with zero bits at p = 1/2; libvpx's encoder flushes
 * 32 of them, from memory of vp8_stop_encode). The margins leave room for other encoders.
 */
const MAX_UNREAD = 8;
const MAX_OVERRUN = 2;

function judge(end: PartitionEnd, name: string): void {
  if (end.overrun > MAX_OVERRUN) throw new WebpDamage(`${name} runs out ${end.overrun} bytes before its content ends (cut short or damaged)`);
  if (end.unread > MAX_UNREAD) throw new WebpDamage(`${name} has ${end.unread} bytes its content does not account for (damaged)`);
  if (end.tail !== 0) throw new WebpDamage(`${name} does not end with the encoder's flush (damaged)`);
}

/** VP8L header (WebP lossless bitstream specification; layout from memory): signature 0x2f, 14-bit sizes minus one, alpha bit, version 0. */
function checkLossless(img: WebpImage): void {
  const d = img.bitstream.data;
  if (d.length < 5 || d[0] !== 0x2f) throw new WebpDamage('the VP8L signature byte 0x2f is missing');
  const bits = (d[1] | (d[2] << 8) | (d[3] << 16) | (d[4] << 24)) >>> 0;
  const [w, h, version] = [1 + (bits & 0x3fff), 1 + ((bits >>> 14) & 0x3fff), bits >>> 29];
  if (version !== 0) throw new WebpDamage(`the VP8L version is ${version}, not 0`);
  if (img.width > 0 && (w !== img.width || h !== img.height)) throw new WebpDamage(`the VP8L image is ${w}x${h}, its container says ${img.width}x${img.height}`);
}

/** ALPH header byte (container specification; layout from memory): reserved 2 bits, pre-processing (0 or 1), filtering (0..3), compression (0 raw, 1 lossless). */
function checkAlpha(img: WebpImage, width: number, height: number): void {
  const a = img.alpha!.data;
  if (a.length < 2) throw new WebpDamage('the ALPH chunk is empty');
  const compression = a[0] & 3;
  if (compression > 1 || ((a[0] >> 4) & 3) > 1) throw new WebpDamage('the ALPH header names an unknown method');
  if (compression === 0 && a.length !== 1 + width * height) throw new WebpDamage('the raw ALPH data does not match the image size');
}

/** Yields to the event loop every few milliseconds of parsing. */
async function runSliced<T>(g: Generator<void, T>, sliceMs = 8): Promise<T> {
  let started = performance.now();
  for (;;) {
    const r = g.next();
    if (r.done) return r.value;
    if (performance.now() - started > sliceMs) {
      await new Promise((resolve) => setImmediate(resolve));
      started = performance.now();
    }
  }
}

/**
 * Resolves when `bytes` (a RIFF/WEBP file) is well formed down to its VP8 tokens; rejects with
 * a WebpDamage that says what is wrong otherwise.
 */
export async function checkWebp(bytes: Uint8Array): Promise<void> {
  const { images } = webpImages(bytes);
  for (const [i, img] of images.entries()) {
    const where = images.length > 1 ? `frame ${i}: ` : '';
    if (img.bitstream.fourcc === 'VP8L') {
      checkLossless(img);
      continue;
    }
    const vp8 = await runSliced(parseVp8(img.bitstream.data));
    if (img.width > 0 && (vp8.width !== img.width || vp8.height !== img.height)) {
      throw new WebpDamage(`${where}the VP8 frame is ${vp8.width}x${vp8.height}, its container says ${img.width}x${img.height}`);
    }
    judge(vp8.first, `${where}the first VP8 partition`);
    vp8.tokens.forEach((t, p) => judge(t, `${where}VP8 token partition ${p}`));
    if (img.alpha) checkAlpha(img, vp8.width, vp8.height);
  }
}
