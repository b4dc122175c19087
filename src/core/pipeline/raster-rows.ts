import type { PixelRaster } from '../types.js';
import { decodeRow, encodeRow, type RowCodec } from '../color/index.js';
import { bitBuckets8 } from '../color/bit-buckets.js';
import type { RowSource } from '../resample/index.js';
import type { Arena, SimdKernels } from '../simd/index.js';

/** Where one source row's samples start: row y is `data[at .. at + width * channels)`. */
export interface RowSpan {
  data: Uint8Array | Uint16Array;
  at: number;
}

/** Finds source row y (rows are asked in non-decreasing order, each at most once per pass). */
export type RowAt = (y: number) => RowSpan;

/** Row y of the raster's own samples. */
export function ownRows(src: PixelRaster): RowAt {
  const n = src.width * src.channels;
  return (y) => ({ data: src.data, at: y * n });
}

/** Scratch bytes the SIMD row decoder needs for one row of this raster (0 when it is not used). */
export function rowScratchBytes(src: PixelRaster, codec: RowCodec): number {
  if (codec.alpha >= 0) return 0;
  const n = src.width * src.channels;
  return n * src.data.BYTES_PER_ELEMENT + codec.toWork.length * 4;
}

/**
 * The raster's rows as working floats (linear light or encoded values, alpha premultiplied as
 * the codec says), each row found by `rowAt` (default: the raster's own samples). Without
 * alpha, and with the SIMD kernels and an arena at hand, each row's
 * codes are copied next to the lookup table in the kernels' memory and converted there;
 * otherwise decodeRow does it. Both give the same floats (the same table). Not in place.
 */
export function rasterRows(src: PixelRaster, codec: RowCodec, simd?: { k: SimdKernels; arena: Arena }, rowAt: RowAt = ownRows(src)): RowSource {
  const { data, width, channels } = src;
  const n = width * channels;
  const decode = (y: number, buf: Float32Array, at: number) => {
    const row = rowAt(y);
    decodeRow(codec, row.data, row.at, width, buf, at);
  };
  if (!simd || codec.alpha >= 0) return { width, lanes: channels, read: decode };
  const { k, arena } = simd;
  const deep = data instanceof Uint16Array;
  const lut = arena.scratch(codec.toWork.length * 4);
  new Float32Array(k.memory.buffer, lut, codec.toWork.length).set(codec.toWork);
  const codes = arena.scratch(n * data.BYTES_PER_ELEMENT);
  const stage = deep ? new Uint16Array(k.memory.buffer, codes, n) : new Uint8Array(k.memory.buffer, codes, n);
  const convert = deep ? k.decode16 : k.decode8;
  return {
    width,
    lanes: channels,
    read(y, buf, at) {
      if (buf.buffer !== k.memory.buffer) return decode(y, buf, at);
      const row = rowAt(y);
      stage.set(row.data.subarray(row.at, row.at + n)); // one small view per row; the copy is a memcpy
      convert(buf.byteOffset + at * 4, codes, lut, n);
    },
  };
}

/** Whether the SIMD quantiser serves this codec (8-bit, linear light, no alpha). */
function simdEncodes(codec: RowCodec): boolean {
  return codec.alpha < 0 && codec.max === 255 && codec.quantiser !== undefined;
}

/** Scratch bytes the SIMD row encoder needs for rows of `samples` samples (0 when not used). */
export function encodeScratchBytes(codec: RowCodec, samples: number): number {
  const q = codec.quantiser;
  if (!simdEncodes(codec) || !q) return 0;
  const { thresholds, start } = bitBuckets8(q);
  return samples + thresholds.length * 4 + start.length + 64;
}

/**
 * Writes working rows (dstW pixels) as codes into out, row o - r0: unpremultiplied, clamped
 * and correctly rounded (encodeRow), or, for 8-bit linear rows without alpha with the SIMD
 * kernels at hand, quantised in the kernels' memory with the same thresholds (bucketed by the
 * floats' bits, color/bit-buckets.ts) and copied out.
 */
export function rowEncoder(
  codec: RowCodec,
  out: Uint8Array | Uint16Array,
  dstW: number,
  r0: number,
  simd?: { k: SimdKernels; arena: Arena },
): (o: number, line: Float32Array) => void {
  const n = dstW * codec.channels;
  const q = codec.quantiser;
  if (!simd || !q || !simdEncodes(codec)) return (o, line) => encodeRow(codec, line, 0, dstW, out, (o - r0) * n);
  const { k, arena } = simd;
  const b = bitBuckets8(q);
  const thresholds = arena.scratch(b.thresholds.length * 4);
  new Float32Array(k.memory.buffer, thresholds, b.thresholds.length).set(b.thresholds);
  const start = arena.scratch(b.start.length);
  new Uint8Array(k.memory.buffer, start, b.start.length).set(b.start);
  const codes = arena.scratch(n);
  const row = new Uint8Array(k.memory.buffer, codes, n);
  return (o, line) => {
    if (line.buffer !== k.memory.buffer) return encodeRow(codec, line, 0, dstW, out, (o - r0) * n);
    k.quantise8(codes, line.byteOffset, n, thresholds, start, b.shift, b.base);
    out.set(row, (o - r0) * n);
  };
}
