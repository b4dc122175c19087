import type { PixelRaster } from './types.js';
import { decodeRow, type RowCodec } from './color/index.js';
import type { RowSource } from './resample/index.js';
import type { Arena, SimdKernels } from './simd/index.js';

/** Scratch bytes the SIMD row decoder needs for one row of this raster (0 when it is not used). */
export function rowScratchBytes(src: PixelRaster, codec: RowCodec): number {
  if (codec.alpha >= 0) return 0;
  const n = src.width * src.channels;
  return n * src.data.BYTES_PER_ELEMENT + codec.toWork.length * 4;
}

/**
 * The raster's rows as working floats (linear light or encoded values, alpha premultiplied as
 * the codec says). Without alpha, and with the SIMD kernels and an arena at hand, each row's
 * codes are copied next to the lookup table in the kernels' memory and converted there;
 * otherwise decodeRow does it. Both give the same floats (the same table). Not in place.
 */
export function rasterRows(src: PixelRaster, codec: RowCodec, simd?: { k: SimdKernels; arena: Arena }): RowSource {
  const { data, width, channels } = src;
  const n = width * channels;
  if (!simd || codec.alpha >= 0) {
    return { width, lanes: channels, read: (y, buf, at) => decodeRow(codec, data, y * n, width, buf, at) };
  }
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
      if (buf.buffer !== k.memory.buffer) return decodeRow(codec, data, y * n, width, buf, at);
      stage.set(data.subarray(y * n, y * n + n)); // one small view per row; the copy is a memcpy
      convert(buf.byteOffset + at * 4, codes, lut, n);
    },
  };
}
