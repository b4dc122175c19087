import { afterAll, describe, expect, it } from 'vitest';
import { fftPlan } from '../../../src/core/spectrum/fft.js';
import { fft2dBitReversed } from '../../../src/core/spectrum/fft2d.js';
import { analyzeSpectrum } from '../../../src/core/spectrum/index.js';
import { setSpectrumSimdEnabled, simdFft2d } from '../../../src/core/spectrum/simd.js';
import type { Channels, PixelRaster } from '../../../src/core/types.js';
import { grating, greyRaster, noise } from '../risk/patterns.js';
import { seededRandom } from './signals.js';

/** Seeded noise in every channel, 8-bit (the Wasm luminance loop) or 16-bit (the scalar one). */
function colourNoise(width: number, height: number, channels: Channels, deep = false, gamut?: 'display-p3'): PixelRaster {
  const rnd = seededRandom(width * channels);
  const max = deep ? 65535 : 255;
  const data = deep ? new Uint16Array(width * height * channels) : new Uint8Array(width * height * channels);
  for (let i = 0; i < data.length; i++) data[i] = Math.floor(rnd() * (max + 1));
  return { data, width, height, channels, ...(gamut ? { gamut } : {}) };
}

afterAll(() => setSpectrumSimdEnabled(true));

// The SIMD transform (assembly/spectrum.ts) does the scalar one's operations in the same order
// with the same IEEE-754 rounding (f64x2 add/sub/mul, no fused multiply-add), so the check is
// equality bit for bit, not a tolerance.
describe('SIMD 2-D FFT (f64x2)', () => {
  it('is available on the engines the project supports (Node 20 and 24 have Wasm SIMD)', () => {
    expect(simdFft2d(fftPlan(128))).not.toBeNull();
  });

  it.each([4, 8, 16, 32, 64, 128])('equals fft2dBitReversed bit for bit on seeded noise, side %i', (n) => {
    const plan = fftPlan(n);
    const simd = simdFft2d(plan)!;
    const rnd = seededRandom(n);
    const re = new Float64Array(n * n).map(() => rnd() - 0.5);
    const im = new Float64Array(n * n).map(() => rnd() - 0.5);
    simd.re.set(re);
    simd.im.set(im);
    fft2dBitReversed(plan, re, im);
    simd.run();
    expect(Array.from(simd.re)).toEqual(Array.from(re));
    expect(Array.from(simd.im)).toEqual(Array.from(im));
  });

  it('serves sides 4..128 only', () => {
    expect(simdFft2d(fftPlan(2))).toBeNull();
    expect(simdFft2d(fftPlan(256))).toBeNull();
  });

  it('gives the same Welch spectrum as the scalar loops (1-4 channels, 8 and 16 bits, sRGB and P3, sizes switching)', () => {
    const sources = [
      greyRaster(640, 480, grating(0.31, 0.07, 0.4)),
      greyRaster(200, 130, noise(200, 130, 0.3, 7), 8),
      greyRaster(37, 21, noise(37, 21, 0.2, 3)),
      colourNoise(300, 260, 3),
      colourNoise(300, 260, 4),
      colourNoise(300, 260, 3, false, 'display-p3'),
      colourNoise(90, 70, 4, true),
      colourNoise(90, 70, 2),
    ];
    for (const src of sources) {
      setSpectrumSimdEnabled(false);
      const ref = analyzeSpectrum(src);
      setSpectrumSimdEnabled(true);
      const got = analyzeSpectrum(src);
      expect(got.tileSize).toBe(ref.tileSize);
      expect(Array.from(got.power)).toEqual(Array.from(ref.power));
      expect(Array.from(got.grid.power)).toEqual(Array.from(ref.grid.power));
      expect([got.coarse, got.mean]).toEqual([ref.coarse, ref.mean]);
    }
  });
});

describe('analyzeSpectrum read row by row (SpectrumOptions.rowAt)', () => {
  it('gives the whole raster\'s spectrum bit for bit, SIMD and scalar, reading each tile\'s rows once', () => {
    const sources = [
      greyRaster(640, 480, grating(0.31, 0.07, 0.4)),
      colourNoise(300, 260, 3),
      colourNoise(300, 260, 4),
      colourNoise(300, 260, 3, false, 'display-p3'),
      colourNoise(90, 70, 4, true),
      colourNoise(90, 70, 2),
    ];
    for (const simd of [true, false]) {
      setSpectrumSimdEnabled(simd);
      for (const src of sources) {
        const n = src.width * src.channels;
        let asked = 0;
        // Each row handed out as a copy at an offset in a buffer of its own; src.data is empty.
        const rowAt = (y: number) => {
          asked++;
          const data = src.data instanceof Uint16Array ? new Uint16Array(n + 5) : new Uint8Array(n + 5);
          data.set(src.data.subarray(y * n, (y + 1) * n), 5);
          return { data, at: 5 };
        };
        const got = analyzeSpectrum({ ...src, data: src.data.subarray(0, 0) }, { rowAt });
        const ref = analyzeSpectrum(src);
        expect(got).toEqual(ref);
        expect(asked).toBe(ref.tiles * ref.tileSize);
      }
    }
  });
});
