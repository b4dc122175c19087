import type { SimdKernels } from './kernels.js';

/** First byte the arena hands out: the low page is left to the module's own data. */
const BASE = 65536;
const PAGE = 65536;

/** Buffers of one render inside the SIMD memory, handed out by a bump pointer. */
export interface Arena {
  floats(n: number): Float32Array;
  ints(n: number): Int32Array;
  /** Byte address of a scratch area of n bytes. */
  scratch(n: number): number;
}

/**
 * An arena of at least `bytes` in the kernels' memory, starting over at each call (renders on
 * one thread run one at a time, and nothing outlives its render). The memory grows before any
 * view is made, so no view of this render is detached. Each buffer is 16-byte aligned and
 * padded by 4 elements, since a pixel's f32x4 load reads up to 3 floats past it.
 */
export function arenaFor(k: SimdKernels, bytes: number): Arena {
  const need = BASE + bytes;
  const have = k.memory.buffer.byteLength;
  if (need > have) k.memory.grow(Math.ceil((need - have) / PAGE));
  const buffer = k.memory.buffer;
  let at = BASE;
  const take = (n: number) => {
    const p = at;
    at += (((n + 4) * 4 + 15) >> 4) << 4;
    if (at > buffer.byteLength) throw new RangeError('SIMD arena sized too small');
    return p;
  };
  return {
    floats: (n) => new Float32Array(buffer, take(n), n),
    ints: (n) => new Int32Array(buffer, take(n), n),
    scratch: (n) => take(Math.ceil(n / 4)),
  };
}

/** Bytes an arena needs for buffers of these element counts. */
export function arenaBytes(counts: readonly number[]): number {
  return counts.reduce((sum, n) => sum + ((((n + 4) * 4 + 15) >> 4) << 4), 0);
}
