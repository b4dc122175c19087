import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoImages, encodeDemo, ensureDemoImages } from '../../tools/demo/index.js';
import { demoExtras } from '../../tools/demo/extras.js';
import { decodeImage } from '../../src/codec/decode.js';

const limits = { maxPixels: 40_000_000, maxDimension: 20_000 };
let first: string;
let paths: string[];

beforeAll(async () => {
  first = await mkdtemp(join(tmpdir(), 'foldwise-demo-'));
  paths = await ensureDemoImages(first);
}, 120_000);
afterAll(async () => {
  await rm(first, { recursive: true, force: true });
});

describe('demo pictures', () => {
  it('are all made, under the documented names', () => {
    expect(paths).toEqual([...demoImages.map((d) => d.path), ...demoExtras.map((d) => d.path)]);
    expect(paths).toEqual(
      expect.arrayContaining(['fabrics/pinstripe.png', 'fabrics/herringbone.jpg', 'shop/brick-front.jpg', 'labels/care-label.png', 'products/scarf.png']),
    );
  });

  it.each(['products/scarf.png', 'fabrics/twill.jpg'])(
    '%s is the same bytes when made again (seeded, no Math.random)',
    async (path) => {
      const image = demoImages.find((d) => d.path === path)!;
      const again = await encodeDemo(path, image.make());
      expect(again.equals(await readFile(join(first, path)))).toBe(true);
    },
  );

  it('decode as the format their name says, big enough to alias when shrunk', async () => {
    for (const path of demoImages.map((d) => d.path)) {
      const { raster, format, hasAlpha } = await decodeImage(await readFile(join(first, path)), limits);
      expect(format).toBe(path.endsWith('.png') ? 'png' : 'jpeg');
      expect(Math.max(raster.width, raster.height)).toBeGreaterThanOrEqual(1600);
      expect(Math.max(raster.width, raster.height)).toBeLessThanOrEqual(3000);
      // Only the product shot is cut out; it has real transparency, not an opaque alpha.
      expect(hasAlpha, path).toBe(path === 'products/scarf.png');
    }
  });

  it('keep existing files as they are', async () => {
    const file = join(first, 'fabrics/pinstripe.png');
    const before = await stat(file);
    await ensureDemoImages(first);
    expect((await stat(file)).mtimeMs).toBe(before.mtimeMs);
  });

  it('pinstripe: a stripe period of 13.2 px, above the new Nyquist for an 8x shrink', async () => {
    // Sampling theorem (Shannon 1949): after shrinking by 8 the new Nyquist is 1/16 = 0.0625
    // cycles per source pixel; the stripes at 1/13.2 = 0.0758 lie above it and must be
    // filtered out, or they fold back. Checked with a direct DFT of the column means.
    const { raster } = await decodeImage(await readFile(join(first, 'fabrics/pinstripe.png')), limits);
    const { width, height, channels, data } = raster;
    const columns = new Float64Array(width);
    for (let y = 0; y < height; y += 4) for (let x = 0; x < width; x++) columns[x] += data[(y * width + x) * channels];
    const mean = columns.reduce((s, v) => s + v, 0) / width;
    const power = (f: number) => {
      let re = 0;
      let im = 0;
      for (let x = 0; x < width; x++) {
        re += (columns[x] - mean) * Math.cos(2 * Math.PI * f * x);
        im -= (columns[x] - mean) * Math.sin(2 * Math.PI * f * x);
      }
      return re * re + im * im;
    };
    const stripe = power(1 / 13.2);
    for (const f of [0.03, 0.05, 0.065, 0.09, 0.11]) expect(stripe).toBeGreaterThan(20 * power(f));
    expect(1 / 13.2).toBeGreaterThan(1 / 16);
  });
});

describe('demo extras', () => {
  it('the yarn shot is Display P3 with colours beyond sRGB; the swatch is animated', async () => {
    const yarn = await readFile(join(first, 'products/dyed-yarn-p3.jpg'));
    const kept = await decodeImage(yarn, limits, { gamut: 'source', frames: 0 });
    expect(kept.raster.gamut).toBe('display-p3');
    const swatch = await decodeImage(await readFile(join(first, 'products/swatch-turn.gif')), limits, { gamut: 'source', frames: 'all' });
    expect(swatch.animation).toEqual({ frames: 6, delays: [120, 120, 120, 120, 120, 120], loop: 0 });
  });
});
