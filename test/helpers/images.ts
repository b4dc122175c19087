import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';

/** Raw interleaved 8-bit pixels from a per-pixel function. */
export function raw8(width: number, height: number, channels: 1 | 2 | 3 | 4, f: (x: number, y: number) => number[]): Buffer {
  const buf = Buffer.alloc(width * height * channels);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) buf.set(f(x, y).slice(0, channels), (y * width + x) * channels);
  }
  return buf;
}

/** Writes raw 8-bit pixels as a PNG under dir/name. */
export async function writePng(dir: string, name: string, width: number, height: number, channels: 1 | 2 | 3 | 4, f: (x: number, y: number) => number[]): Promise<void> {
  const png = await sharp(raw8(width, height, channels, f), { raw: { width, height, channels } }).png().toBuffer();
  await writeFile(join(dir, name), png);
}

/** Four flat quadrants: red top-left, green top-right, blue bottom-left, white bottom-right. */
export const quadrantColour = (w: number, h: number) => (x: number, y: number): number[] => {
  const right = x >= w / 2;
  const bottom = y >= h / 2;
  if (!right && !bottom) return [255, 0, 0];
  if (right && !bottom) return [0, 255, 0];
  if (!right && bottom) return [0, 0, 255];
  return [255, 255, 255];
};

/** Decodes a response body to raw pixels. */
export async function pixels(body: Buffer) {
  const { data, info } = await sharp(body).raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height, channels: info.channels };
}

/** The pixel at (x, y) of a decoded image. */
export function at(img: { data: Buffer; width: number; channels: number }, x: number, y: number): number[] {
  const i = (y * img.width + x) * img.channels;
  return [...img.data.subarray(i, i + img.channels)];
}
