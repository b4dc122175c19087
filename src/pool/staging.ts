import type { PixelRaster } from '../core/types.js';
import type { SharedRaster } from './worker.js';

/**
 * Reused buffers: by default SharedArrayBuffers for the sources handed to the worker threads,
 * also a worker's own blocks of spool rows (spool/rows.ts, with `make` an ArrayBuffer). A fresh
 * buffer of a 12 MP source costs its page faults and zeroing on every render, about four times
 * the copy into a buffer already mapped (scripts/bench.ts shows the pool's part); reusing one
 * leaves the copy. Idle buffers are kept up to `keep` (one per render that may hold pixels at a
 * time) and `maxBytes` each, so what stays mapped between renders is bounded; larger ones are
 * made for their job alone, dropped after it.
 */
export class StagingBuffers<B extends ArrayBuffer | SharedArrayBuffer = SharedArrayBuffer> {
  private readonly idle: B[] = [];

  constructor(
    private readonly keep: number,
    private readonly maxBytes: number,
    private readonly make: (bytes: number) => B = ((bytes: number) => new SharedArrayBuffer(bytes)) as (bytes: number) => B,
  ) {}

  /** A buffer of at least `bytes`: the smallest idle one that fits, else a new one. */
  take(bytes: number): B {
    let best = -1;
    for (let i = 0; i < this.idle.length; i++) {
      const size = this.idle[i].byteLength;
      if (size >= bytes && (best < 0 || size < this.idle[best].byteLength)) best = i;
    }
    if (best >= 0) return this.idle.splice(best, 1)[0];
    // Whole MiB, so sources of nearly the same size share buffers.
    return this.make(Math.ceil(bytes / 2 ** 20) * 2 ** 20);
  }

  /** Returns a buffer taken by `take` once no task reads it any more; the smallest goes past `keep`. */
  give(buffer: B): void {
    if (buffer.byteLength > this.maxBytes) return;
    this.idle.push(buffer);
    if (this.idle.length > this.keep) {
      this.idle.sort((a, b) => b.byteLength - a.byteLength);
      this.idle.length = this.keep;
    }
  }

  /** Bytes held by idle buffers. */
  get idleBytes(): number {
    return this.idle.reduce((sum, b) => sum + b.byteLength, 0);
  }
}

/** Copies a raster into a staging buffer (its primaries and frame count noted), for the worker threads. */
export function share(raster: PixelRaster, staging: StagingBuffers): SharedRaster {
  const depth = raster.data instanceof Uint16Array ? 16 : 8;
  const buffer = staging.take(raster.data.byteLength);
  (depth === 16 ? new Uint16Array(buffer) : new Uint8Array(buffer)).set(raster.data);
  const shared: SharedRaster = { buffer, width: raster.width, height: raster.height, channels: raster.channels, depth };
  if (raster.gamut) shared.gamut = raster.gamut;
  if (raster.sourceFrames !== undefined) shared.sourceFrames = raster.sourceFrames;
  return shared;
}
