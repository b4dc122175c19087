import { decodeImage } from './decode.js';
import { encodeImage } from './encode.js';
import { probeSpooledDecode } from './spool-decode.js';

const limits = { maxPixels: 1 << 20, maxDimension: 1024 };

/**
 * Runs once, in this thread, what a render asks of sharp (RenderPool.warm): a small JPEG is
 * encoded as renditions are, its header read, and decoded in memory and, given a path, to a
 * spool file; so the first request does not pay for loading libvips' codecs.
 */
export async function warmCodecs(spoolFile?: string): Promise<void> {
  const side = 64;
  const data = new Uint8Array(side * side * 3);
  for (let i = 0; i < data.length; i++) data[i] = (i * 37) & 255;
  const jpeg = await encodeImage({ data, width: side, height: side, channels: 3 }, { format: 'jpeg', background: { r: 255, g: 255, b: 255 } });
  await decodeImage(jpeg, limits);
  const probe = spoolFile ? await probeSpooledDecode(jpeg, limits) : null;
  await probe?.write(spoolFile!);
}
