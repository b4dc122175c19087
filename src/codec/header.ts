import { type DecodeLimits, type DecodeWish, prepare, stillSrgb, withinDecodeDeadline } from './decode-setup.js';

/** What a source's header says about the raster its decode will give (src/codec/decode.ts). */
export interface SourceHeader {
  width: number;
  height: number;
  /** Channels of the decoded raster: 1 or 3, plus one for alpha (before an opaque alpha is dropped). */
  channels: number;
  /** Bytes per decoded sample: 2 for 16-bit sources, else 1. */
  bytesPerSample: 1 | 2;
  hasAlpha: boolean;
  format: string;
  /** Frames the decode will give (1 for a still or a single frame asked for). */
  frames?: number;
}

/**
 * Reads the header only (no pixel is decoded), with decodeImage's checks and errors: the
 * limits on pixels, sides and frames refuse a source here already. With `wish` asking for
 * every frame, `frames` says how many the decode gives (the cost scales with it).
 */
export async function readHeader(bytes: Buffer, limits: DecodeLimits, wish: DecodeWish = stillSrgb): Promise<SourceHeader> {
  const p = await withinDecodeDeadline(prepare(bytes, limits, wish), limits.timeoutMs);
  const channels = (p.grey ? 1 : 3) + (p.hasAlpha ? 1 : 0);
  const frames = p.animation?.frames ?? 1;
  return { width: p.width, height: p.height, channels, bytesPerSample: p.deep ? 2 : 1, hasAlpha: p.hasAlpha, format: p.format, frames };
}
