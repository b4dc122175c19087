import { describe, expect, it } from 'vitest';
import { hexColour, linearMeanColour } from '../../../src/core/color/index.js';
import type { Channels } from '../../../src/core/types.js';

const raster = (channels: Channels, values: number[], bits: 8 | 16 = 8) => ({
  data: bits === 8 ? Uint8Array.from(values) : Uint16Array.from(values),
  width: values.length / channels,
  height: 1,
  channels,
});

// Check values from CHECKS.md (IEC 61966-2-1:1999): black and white average to linear 0.5,
// which encodes to code 188 (the mean of the codes, 128, is the wrong answer); a 50/200 pair
// averages to 149.94 in linear light, so 150.
describe('linearMeanColour', () => {
  it('averages light, not codes', () => {
    expect(linearMeanColour(raster(3, [0, 0, 0, 255, 255, 255]))).toEqual([188, 188, 188]);
    expect(linearMeanColour(raster(3, [50, 200, 0, 200, 50, 255]))).toEqual([150, 150, 188]);
    expect(linearMeanColour(raster(1, [0, 255]))).toEqual([188, 188, 188]);
  });

  it('reads 16-bit codes on their own scale', () => {
    expect(linearMeanColour(raster(3, [0, 0, 0, 65535, 65535, 65535], 16))).toEqual([188, 188, 188]);
  });

  it('weights by alpha: a transparent pixel adds no colour', () => {
    expect(linearMeanColour(raster(4, [255, 0, 0, 255, 0, 0, 255, 0]))).toEqual([255, 0, 0]);
    expect(linearMeanColour(raster(2, [0, 255, 255, 255]))).toEqual([188, 188, 188]);
    expect(linearMeanColour(raster(4, [9, 9, 9, 0]))).toEqual([0, 0, 0]);
  });

  it('writes CSS hex', () => {
    expect(hexColour([188, 10, 255])).toBe('#bc0aff');
  });
});
