import { describe, expect, it } from 'vitest';
import { decodeRow, rowCodec } from '../../../src/core/color/index.js';
import { reduceTable } from '../../../src/core/resample/pyramid.js';
import { fusesReduce, reducedRows, reducedRowsFloats } from '../../../src/core/pipeline/reduced-rows.js';
import { resampleAxis, type WeightTable } from '../../../src/core/resample/index.js';
import { arenaBytes, arenaFor, simdKernels } from '../../../src/core/simd/index.js';
import type { Channels, PixelRaster } from '../../../src/core/types.js';

function raster(width: number, height: number, channels: Channels): PixelRaster {
  const data = new Uint8Array(width * height * channels);
  let s = width * 31 + channels;
  for (let i = 0; i < data.length; i++) data[i] = (s = (s * 1103515245 + 12345) >>> 0) >>> 24;
  return { data, width, height, channels };
}

describe('decode and pyramid reduce along x in one SIMD pass', () => {
  // Odd and even widths, down to the smallest with an interior output; grey and RGB.
  it.each([[3, 9], [3, 10], [1, 11], [3, 4000], [1, 257], [3, 6]] as Array<[Channels, number]>)(
    '%i channels, %i px wide: the reference decodeRow + resampleAxis, to float32 rounding',
    (channels, width) => {
      const k = simdKernels()!;
      const src = raster(width, 3, channels);
      const codec = rowCodec(false, channels, true, false);
      const bx = reduceTable(width, true);
      expect(fusesReduce(src, codec, bx, true)).toBe(true);
      const n = bx.dstLen * channels;
      const arena = arenaFor(k, arenaBytes([width * channels, 256, bx.dstLen, bx.weights.length, reducedRowsFloats(src), n]) + 4096);
      const start = arena.ints(bx.dstLen);
      start.set(bx.start);
      const weights = arena.floats(bx.weights.length);
      weights.set(bx.weights);
      const placed: WeightTable = { ...bx, start, weights, simd: k };
      const rows = reducedRows(src, codec, placed, { k, arena });
      expect(rows.width).toBe(bx.dstLen);
      const got = arena.floats(n);
      const line = new Float32Array(width * channels);
      const want = new Float32Array(n);
      for (let y = 0; y < 3; y++) {
        rows.read(y, got, 0);
        decodeRow(codec, src.data, y * width * channels, width, line, 0);
        resampleAxis(want, 0, channels, line, 0, channels, channels, bx, 0, bx.dstLen);
        for (let i = 0; i < n; i++) expect(Math.abs(got[i] - want[i])).toBeLessThanOrEqual(2e-7);
      }
    },
  );

  it('is not taken for alpha, 16-bit codes, or an x table that does not reduce', () => {
    const src = raster(20, 2, 3);
    expect(fusesReduce(src, rowCodec(false, 3, true, false), reduceTable(20, false), true)).toBe(false);
    expect(fusesReduce(src, rowCodec(false, 4, true, true), reduceTable(20, true), true)).toBe(false);
    const deep = { ...src, data: new Uint16Array(src.data.length) };
    expect(fusesReduce(deep, rowCodec(true, 3, true, false), reduceTable(20, true), true)).toBe(false);
    expect(fusesReduce(src, rowCodec(false, 3, true, false), reduceTable(20, true), false)).toBe(false);
  });
});
