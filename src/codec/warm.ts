import { decodeImage } from './decode.js';
import { encodeImage } from './encode.js';
import { probeSpooledDecode } from './spool-decode.js';

const limits = { maxPixels: 1 << 22, maxDimension: 2048 };

/** Side of the warm-up picture: tall enough for the analysis's largest tiles (128 px, tiles.ts). */
export const WARM_WIDTH = 640;
export const WARM_HEIGHT = 480;

/** Stripes at 0.3 cycles per pixel along x and 0.2 along y, in colour: content a reduction folds. */
function pattern(width: number, height: number): Uint8Array {
  const data = new Uint8Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const v = 128 + 100 * Math.cos(2 * Math.PI * (0.3 * x + 0.2 * y));
      const i = (y * width + x) * 3;
      data[i] = Math.round(v);
      data[i + 1] = Math.round(255 - v);
      data[i + 2] = (x ^ y) & 255;
    }
  }
  return data;
}

/**
 * Runs once, in this thread, what a render asks of sharp (RenderPool.warm): a JPEG of the
 * warm-up pattern is encoded as renditions are, its header read, and decoded in memory and,
 * given a path, to a spool file (which the pool's threads then read as a streamed render
 * does, pool/warm.ts); so the first request does not pay for loading libvips' codecs.
 * Resolves whether the spool file was written.
 */
export async function warmCodecs(spoolFile?: string): Promise<boolean> {
  const data = pattern(WARM_WIDTH, WARM_HEIGHT);
  const jpeg = await encodeImage({ data, width: WARM_WIDTH, height: WARM_HEIGHT, channels: 3 }, { format: 'jpeg', background: { r: 255, g: 255, b: 255 } });
  await decodeImage(jpeg, limits);
  const probe = spoolFile ? await probeSpooledDecode(jpeg, limits) : null;
  if (!probe) return false;
  await probe.write(spoolFile!);
  return true;
}
