import { mkdir, rename, stat, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import sharp from 'sharp';
import { gingham, herringbone, pinstripe, twill } from './fabrics.js';
import { careLabel } from './label.js';
import { toBytes, type Picture } from './picture.js';
import { foldedScarf } from './scarf.js';
import { brickFront } from './shopfront.js';
import { demoExtras } from './extras.js';

/**
 * The demo pictures of our own small textile shop, made by seeded code: every run, on every
 * machine, makes the same bytes. Each is 1600..2400 px so that it aliases when shrunk to
 * web sizes, which is what the service is for.
 */
export const demoImages: readonly { path: string; make: () => Picture; describe: string }[] = [
  { path: 'fabrics/twill.jpg', make: twill, describe: 'indigo 2/2 twill, 3.2 px threads' },
  { path: 'fabrics/pinstripe.png', make: pinstripe, describe: 'navy shirting, pinstripes 13.2 px apart' },
  { path: 'fabrics/herringbone.jpg', make: herringbone, describe: 'heathered herringbone tweed' },
  { path: 'fabrics/gingham.png', make: gingham, describe: 'red and white gingham, 16.8 px checks' },
  { path: 'shop/brick-front.jpg', make: brickFront, describe: 'brick shopfront with sign, awning, blind and notice' },
  { path: 'labels/care-label.png', make: careLabel, describe: 'woven care label with 5x7-pixel print' },
  { path: 'products/scarf.png', make: foldedScarf, describe: 'folded tartan scarf on transparency' },
];

/** Encodes one picture; fixed encoder settings, no metadata, so the bytes are reproducible. */
export async function encodeDemo(path: string, picture: Picture): Promise<Buffer> {
  const img = sharp(toBytes(picture), {
    raw: { width: picture.width, height: picture.height, channels: picture.channels },
  });
  return path.endsWith('.jpg')
    ? img.jpeg({ quality: 92, chromaSubsampling: '4:4:4' }).toBuffer()
    : // Measured on the pinstripe: level 3 without row filters encodes in a tenth of the time
      // of level 6 with adaptive filters, and the file is smaller (woven texture defeats the
      // filters); the demo must be ready in seconds on a fresh clone.
      img.png({ compressionLevel: 3, adaptiveFiltering: false }).toBuffer();
}

/**
 * Makes every demo picture that is missing under `dir` (existing files are kept as they
 * are) and returns all their paths relative to `dir`, with forward slashes. Each file is
 * written to a temporary name and renamed, so a reader never sees half a picture.
 */
export async function ensureDemoImages(dir: string): Promise<string[]> {
  const all = [
    ...demoImages.map((image) => ({ path: image.path, encode: () => encodeDemo(image.path, image.make()) })),
    ...demoExtras,
  ];
  for (const image of all) {
    const target = join(dir, ...image.path.split('/'));
    const present = await stat(target).then((s) => s.isFile() && s.size > 0, () => false);
    if (present) continue;
    await mkdir(dirname(target), { recursive: true });
    const bytes = await image.encode();
    const temporary = `${target}.${process.pid}.partial`;
    await writeFile(temporary, bytes);
    await rename(temporary, target);
  }
  return all.map((image) => image.path);
}
