/** sharp's decode of a JPEG to raw pixels, the reference step every benchmark ratio divides by. */
import sharp from 'sharp';
import type { PixelRaster } from '../../src/core/types.js';

export async function decodeRaw(jpeg: Buffer): Promise<PixelRaster> {
  const { data, info } = await sharp(jpeg).raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height, channels: info.channels as 3 };
}
