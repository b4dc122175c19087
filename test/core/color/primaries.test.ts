import { describe, expect, it } from 'vitest';
import {
  adobeRgbDecode, adobeRgbSpace, displayP3Space, luminanceCoefficients, rec2020Space, rgbToRgb, rgbToXyz, srgbSpace,
} from '../../../src/core/color/index.js';
import { windowedTileLuminance } from '../../../src/core/spectrum/luminance.js';

function close(actual: number[], expected: number[], tol: number) {
  expect(actual.length).toBe(expected.length);
  actual.forEach((v, i) => expect(Math.abs(v - expected[i]), `entry ${i}: ${v} vs ${expected[i]}`).toBeLessThanOrEqual(tol));
}

describe('RGB-to-XYZ from primaries and white (SMPTE RP 177-1993)', () => {
  it('sRGB gives the matrix of IEC 61966-2-1:1999, §5.2 (four decimals)', () => {
    close(rgbToXyz(srgbSpace), [0.4124, 0.3576, 0.1805, 0.2126, 0.7152, 0.0722, 0.0193, 0.1192, 0.9505], 1e-4);
  });

  it('Adobe RGB (1998) gives the matrix of its specification, §4.3.4.1 (five decimals)', () => {
    close(rgbToXyz(adobeRgbSpace), [0.57667, 0.18556, 0.18823, 0.29734, 0.62736, 0.07529, 0.02703, 0.07069, 0.99134], 1e-5);
  });

  it('Display P3 (SMPTE EG 432-1 primaries, D65) gives the widely published matrix (from memory)', () => {
    close(rgbToXyz(displayP3Space), [0.486571, 0.265668, 0.198217, 0.228975, 0.691739, 0.079287, 0, 0.045113, 1.043944], 2e-6);
  });

  it('white maps to the white point with Y = 1, for every space', () => {
    for (const s of [srgbSpace, displayP3Space, adobeRgbSpace, rec2020Space]) {
      const m = rgbToXyz(s);
      const X = m[0] + m[1] + m[2];
      const Y = m[3] + m[4] + m[5];
      const Z = m[6] + m[7] + m[8];
      close([Y, X / (X + Y + Z), Y / (X + Y + Z)], [1, s.white[0], s.white[1]], 1e-12);
    }
  });
});

describe('luminance coefficients per primaries', () => {
  it('Rec. 2020: 0.2627, 0.6780, 0.0593 (ITU-R BT.2020-2, Table 4)', () => {
    close(luminanceCoefficients(rec2020Space), [0.2627, 0.678, 0.0593], 1e-4);
  });
  it('sRGB: 0.2126, 0.7152, 0.0722 (ITU-R BT.709-6, item 3.2)', () => {
    close(luminanceCoefficients(srgbSpace), [0.2126, 0.7152, 0.0722], 1e-4);
  });

  it('the spectrum reads a Display P3 raster with P3 coefficients, an sRGB one with Rec. 709', () => {
    // Pure green, code 255 (linear 1): the luminance is the green coefficient itself.
    const data = new Uint8Array([0, 255, 0]);
    const out = new Float64Array(1);
    // A window of 1 and the identity order: the plain luminance.
    const [one, identity] = [new Float64Array([1]), new Uint32Array([0])];
    windowedTileLuminance(out, { data, width: 1, height: 1, channels: 3 }, 0, 0, 1, one, identity);
    expect(out[0]).toBeCloseTo(0.7152, 6); // ITU-R BT.709-6
    windowedTileLuminance(out, { data, width: 1, height: 1, channels: 3, gamut: 'display-p3' }, 0, 0, 1, one, identity);
    expect(out[0]).toBeCloseTo(0.691739, 5); // P3 matrix above (from memory)
  });
});

describe('conversions between spaces', () => {
  it('sRGB red sits inside Display P3 at (0.8225, 0.0332, 0.0171) linear (CSS Color 4 sample conversion, from memory)', () => {
    const m = rgbToRgb(srgbSpace, displayP3Space);
    close([m[0], m[3], m[6]], [0.8225, 0.0332, 0.0171], 1e-4);
  });
  it('a space to itself is the identity', () => {
    close(rgbToRgb(displayP3Space, displayP3Space), [1, 0, 0, 0, 1, 0, 0, 0, 1], 1e-12);
  });
  it('Adobe RGB (1998) decodes with the exponent 563/256 (its specification, §4.3.1.2)', () => {
    expect(adobeRgbDecode(0.5)).toBeCloseTo(Math.pow(0.5, 2.19921875), 12);
    expect(adobeRgbDecode(0.5)).toBeCloseTo(0.21776, 5);
    expect(adobeRgbDecode(1)).toBe(1);
    expect(adobeRgbDecode(-0.1)).toBe(0);
  });
});
