import { describe, expect, it } from 'vitest';
import type { SourceSpectrum } from '../../../src/core/risk/index.js';
import { spectrumPicture } from '../../../src/risk/pictures/index.js';
import { marginMap } from '../../../src/risk/pictures/map.js';
import { regionMargins } from '../../../src/risk/pictures/margins.js';
import { blankImage, type RgbImage } from '../../../src/risk/pictures/rgb-image.js';
import { toOklab } from '../../../src/risk/pictures/oklab.js';
import { LOOM_ANCHORS, MADDER_ANCHORS, marginColour, powerColour } from '../../../src/risk/pictures/palette.js';

/** CIE L* of an 8-bit sRGB colour: IEC 61966-2-1 curve and Rec. 709 luminance, CIE 15:2004 L*. */
function lightness([r, g, b]: readonly number[]): number {
  const lin = (c: number) => (c / 255 <= 0.04045 ? c / 255 / 12.92 : ((c / 255 + 0.055) / 1.055) ** 2.4);
  const y = 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
  return y > 216 / 24389 ? 116 * Math.cbrt(y) - 16 : (24389 / 27) * y;
}
const hex = (h: string) => [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16));
const pixel = (img: RgbImage, x: number, y: number) => [...img.data.subarray(3 * (y * img.width + x), 3 * (y * img.width + x) + 3)];

describe('the colour ramps of our own design', () => {
  it('Oklab puts sRGB white at L = 1 with no chroma (Ottosson 2020)', () => {
    const white = toOklab([255, 255, 255]);
    expect(white.L).toBeCloseTo(1, 3);
    expect(Math.hypot(white.a, white.b)).toBeLessThan(1e-3);
  });

  it.each([
    ['loom (spectrum)', powerColour, LOOM_ANCHORS, 1],
    ['madder (visibility)', marginColour, MADDER_ANCHORS, -1],
  ] as const)('%s runs through its anchors with CIE L* moving one way only', (_name, colour, anchors, sign) => {
    expect(colour(0)).toEqual(hex(anchors[0]));
    expect(colour(1)).toEqual(hex(anchors[anchors.length - 1]));
    let previous = lightness(colour(0));
    for (let k = 1; k <= 64; k++) {
      const l = lightness(colour(k / 64));
      // 8-bit rounding may hold a step level; it never turns back by more than a rounding.
      expect(sign * (l - previous)).toBeGreaterThan(-0.3);
      previous = l;
    }
    const span = sign * (lightness(colour(1)) - lightness(colour(0)));
    expect(span).toBeGreaterThan(40);
  });
});

describe('view=spectrum', () => {
  const n = 64;
  const power = new Float32Array(n * n).fill(1e-6);
  power[(n / 2) * n + n / 2 + 16] = 1; // one line at fx = 16/64 = 0.25
  const spectrum = { width: 256, height: 256, tileSize: n, tiles: 1, power } as unknown as SourceSpectrum;
  const flat = () => 1;
  const img = spectrumPicture(spectrum, { nyquist: { x: 0.125, y: 0.125 } }, flat);

  it('draws the plot with margins for labelled axes and a colour bar', () => {
    // 512 px plot (64 cells x 8) plus the label margins; the corners stay paper.
    expect(img.width).toBeGreaterThan(512 + 100);
    expect(img.height).toBeGreaterThan(512 + 40);
    expect(pixel(img, 0, img.height - 1)).toEqual(hex('#f6f5f2'));
    // The axis labels under the plot: ink on paper in the bottom margin.
    let inked = 0;
    for (let y = img.height - 48; y < img.height; y++) for (let x = 0; x < img.width; x++) if (lightness(pixel(img, x, y)) < 30) inked++;
    expect(inked).toBeGreaterThan(200);
  });

  it('shows the line in the top colour, where fx = 0.25 is, and the new Nyquist as a white box', () => {
    const row = [...Array(512).keys()].map((x) => pixel(img, 64 + x, 30 + 32 * 8 + 4));
    const top = row.flatMap((c, x) => (String(c) === String(powerColour(1)) ? [x] : []));
    // Cell 48 of 64 spans plot x 384..391 (8 px per cell, after the 64 px left margin).
    expect(top).toEqual([384, 385, 386, 387, 388, 389, 390, 391]);
    // Nyquist 0.125 = 8 cells right of the centre cell 32: plot x (32 + 8 + 0.5) * 8 = 324.
    expect(pixel(img, 64 + 324, 30 + 32 * 8 + 20)).toEqual([255, 255, 255]);
  });
});

describe('view=map', () => {
  const preview = blankImage(400, 100, [200, 200, 200]);
  const grid = { columns: 4, rows: 1, cells: [0.1, 0.5, 1, 4] };
  const img = marginMap(preview, grid, { width: 400, height: 100 }, { x: 0, y: 0, width: 400, height: 100 });

  it('leaves a region under 1/4 threshold untinted and tints more visible regions darker', () => {
    const [r, g, b] = pixel(img, 50, 60);
    expect(r).toBe(g);
    expect(g).toBe(b);
    const half = lightness(pixel(img, 150, 60));
    const one = lightness(pixel(img, 250, 60));
    const four = lightness(pixel(img, 350, 60));
    expect(half).toBeGreaterThan(one);
    expect(one).toBeGreaterThan(four);
  });

  it('adds a legend strip below the picture, on the same ramp', () => {
    expect(img.height).toBeGreaterThan(100 + 40);
    expect(img.width).toBeGreaterThanOrEqual(400);
    // The bar starts at x 12, 26 px below the picture: the palest colour of the ramp.
    expect(pixel(img, 12, 100 + 30)).toEqual(marginColour(0));
  });
});

describe('margins per region', () => {
  it('draws the model\'s own per-region margins (core/risk/grid.ts), negatives as none', () => {
    expect(regionMargins({ grid: { columns: 3, rows: 1, margins: [0.2, 1.5, -0] } })).toEqual([0.2, 1.5, 0]);
    expect(regionMargins({ grid: { columns: 2, rows: 1, margins: [-1, 4] } })).toEqual([0, 4]);
  });
});
