import type { PixelRaster } from '../types.js';
import { decodeRow, type RowCodec } from '../color/index.js';
import { resampleAxis, type RowSource, type WeightTable } from '../resample/index.js';
import type { Arena, SimdKernels } from '../simd/index.js';
import { ownRows, type RowAt } from './raster-rows.js';

/**
 * Whether the first pyramid stage can take its source rows decoded and reduced along x in one
 * SIMD pass: 8-bit codes without alpha (the rows rasterRows converts in the kernels' memory),
 * with the kernels at hand, and an x table that is the pyramid's symmetric 5-tap reduce.
 */
export function fusesReduce(src: PixelRaster, codec: RowCodec, bx: WeightTable, simd: boolean): boolean {
  return simd && codec.alpha < 0 && src.data instanceof Uint8Array && bx.symmetric5 !== undefined;
}

/** Floats the fused source takes from the arena besides rasterRows' scratch: one decoded row. */
export function reducedRowsFloats(src: PixelRaster): number {
  return src.width * src.channels;
}

/**
 * The raster's rows decoded (as rasterRows does: the codec's table, no alpha) and reduced along
 * x through the pyramid table bx (placed in the arena), bx.dstLen pixels per source row;
 * each row found by `rowAt` (8-bit codes).
 * The reference is decodeRow then resampleAxis through bx. Here each row's codes are copied
 * into the kernels' memory; the interior outputs come from decodeReduce5, which decodes each
 * pixel into a register through the same table and sums as reduce5 does, so the decoded row
 * is never stored; the few border outputs (mirrored taps) decode just the pixels they read and take the pixel pass. Not in place; allocates nothing
 * per row.
 */
export function reducedRows(src: PixelRaster, codec: RowCodec, bx: WeightTable, simd: { k: SimdKernels; arena: Arena }, rowAt: RowAt = ownRows(src)): RowSource {
  const { width, channels: lanes } = src;
  const n = width * lanes;
  const { k, arena } = simd;
  const lut = arena.scratch(codec.toWork.length * 4);
  new Float32Array(k.memory.buffer, lut, codec.toWork.length).set(codec.toWork);
  const codes = arena.scratch(n);
  const stage = new Uint8Array(k.memory.buffer, codes, n);
  const line = arena.floats(n);
  const [a, b, c] = bx.symmetric5!;
  const { dstLen, taps } = bx;
  const start = bx.start.byteOffset;
  const weights = bx.weights.byteOffset;
  // Interior outputs read inputs 2o - 2 .. 2o + 2, all inside the row (as in simdReduce5).
  const first = Math.min(dstLen, 1);
  const last = Math.max(first, Math.min(dstLen, (width - 3) >> 1));
  const head = first > 0 ? (bx.start[first - 1] + taps) * lanes : 0;
  const tail = last < dstLen ? bx.start[last] * lanes : n;
  return {
    width: dstLen,
    lanes,
    read(y, buf, at) {
      const row = rowAt(y);
      if (buf.buffer !== k.memory.buffer) {
        decodeRow(codec, row.data, row.at, width, line, 0);
        return resampleAxis(buf, at, lanes, line, 0, lanes, lanes, bx, 0, dstLen);
      }
      stage.set(row.data.subarray(row.at, row.at + n));
      const out = buf.byteOffset;
      if (head > 0) {
        k.decode8(line.byteOffset, codes, lut, head);
        k.pixels(out, at, lanes, line.byteOffset, 0, lanes, lanes, taps, start, weights, 0, first);
      }
      if (tail < n) {
        k.decode8(line.byteOffset + tail * 4, codes + tail, lut, n - tail);
        k.pixels(out, at, lanes, line.byteOffset, 0, lanes, lanes, taps, start, weights, last, dstLen);
      }
      k.decodeReduce5(out, at, lanes, codes, lut, lanes, a, b, c, first, last);
    },
  };
}
