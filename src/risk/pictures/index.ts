/** The alias-risk pictures (view=map, view=spectrum) and their PNG encoding (sharp encodes only). */
import sharp from 'sharp';
import type { RgbImage } from './rgb-image.js';

export type { RgbImage } from './rgb-image.js';
export { riskMap } from './map.js';
export { halfGainFrequency, spectrumPicture } from './spectrum.js';

/** PNG bytes of an RGB picture (no metadata). */
export function encodePng(img: RgbImage): Promise<Buffer> {
  return sharp(img.data, { raw: { width: img.width, height: img.height, channels: 3 } })
    .png({ compressionLevel: 6 })
    .toBuffer();
}

/** Raw RGB of an encoded picture (a cached rendition), flattened on white. */
export async function decodeRgb(bytes: Buffer): Promise<RgbImage> {
  const { data, info } = await sharp(bytes).flatten({ background: '#ffffff' }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}
