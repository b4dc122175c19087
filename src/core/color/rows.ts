import { srgbToLinear8, srgbToLinear16 } from './srgb.js';
import { srgbQuantiser8, srgbQuantiser16, quantiseRun, type SrgbQuantiser } from './encoder.js';

/** How samples map to working values: through the sRGB curve, or as encoded numbers. */
export interface RowCodec {
  readonly channels: number;
  /** Index of the alpha sample in a pixel, or -1. */
  readonly alpha: number;
  /** Premultiply on decode and unpremultiply on encode (images with some alpha < max). */
  readonly premultiply: boolean;
  readonly max: number;
  /** Working value of every code (colour samples); alpha is always code / max. */
  readonly toWork: Float32Array;
  /** The sRGB quantiser when working in linear light, else undefined. */
  readonly quantiser: SrgbQuantiser | undefined;
  fromWork(v: number): number;
}

function scaleTable(levels: number): Float32Array {
  const t = new Float32Array(levels);
  for (let i = 0; i < levels; i++) t[i] = i / (levels - 1);
  return t;
}

let enc8: Float32Array | undefined;
let enc16: Float32Array | undefined;

/** The codec for a raster of this depth, channel count and light mode. */
export function rowCodec(
  deep: boolean,
  channels: number,
  linear: boolean,
  premultiply: boolean,
): RowCodec {
  const max = deep ? 65535 : 255;
  const toWork = linear
    ? deep ? srgbToLinear16 : srgbToLinear8
    : deep ? (enc16 ??= scaleTable(65536)) : (enc8 ??= scaleTable(256));
  const q = deep ? srgbQuantiser16() : srgbQuantiser8();
  const fromWork = linear
    ? (v: number) => q.encode(v)
    : (v: number) => (v > 0 ? (v >= 1 ? max : Math.floor(v * max + 0.5)) : 0);
  const alpha = channels === 2 || channels === 4 ? channels - 1 : -1;
  return { channels, alpha, premultiply: premultiply && alpha >= 0, max, toWork, quantiser: linear ? q : undefined, fromWork };
}

/**
 * Decodes `width` pixels of src from `srcAt` into working floats at out[outAt...]; colour is
 * premultiplied by alpha when the codec says so. Not in place (integer in, float out).
 */
export function decodeRow(
  codec: RowCodec,
  src: Uint8Array | Uint16Array,
  srcAt: number,
  width: number,
  out: Float32Array,
  outAt: number,
): void {
  const { channels, toWork } = codec;
  const n = width * channels;
  if (!codec.premultiply) {
    const a = codec.alpha;
    for (let i = 0; i < n; i++) out[outAt + i] = toWork[src[srcAt + i]];
    if (a >= 0) {
      const inv = 1 / codec.max;
      for (let i = a; i < n; i += channels) out[outAt + i] = src[srcAt + i] * inv;
    }
    return;
  }
  const inv = 1 / codec.max;
  const a = codec.alpha;
  for (let p = 0; p < n; p += channels) {
    const alpha = src[srcAt + p + a] * inv;
    for (let c = 0; c < a; c++) out[outAt + p + c] = toWork[src[srcAt + p + c]] * alpha;
    out[outAt + p + a] = alpha;
  }
}

/**
 * Encodes `width` working pixels back to codes: unpremultiplies, clamps (overshoot from
 * negative lobes), rounds correctly. A pixel whose alpha rounds to 0 becomes all zeros, so
 * fully transparent stays transparent. Not in place.
 */
export function encodeRow(
  codec: RowCodec,
  src: Float32Array,
  srcAt: number,
  width: number,
  out: Uint8Array | Uint16Array,
  outAt: number,
): void {
  const { channels, max } = codec;
  const n = width * channels;
  const a = codec.alpha;
  if (a < 0) {
    if (codec.quantiser) return quantiseRun(codec.quantiser, src, srcAt, n, out, outAt);
    for (let i = 0; i < n; i++) out[outAt + i] = codec.fromWork(src[srcAt + i]);
    return;
  }
  for (let p = 0; p < n; p += channels) {
    const alpha = src[srcAt + p + a];
    const code = alpha > 0 ? (alpha >= 1 ? max : Math.floor(alpha * max + 0.5)) : 0;
    out[outAt + p + a] = code;
    if (code === 0) {
      for (let c = 0; c < a; c++) out[outAt + p + c] = 0;
      continue;
    }
    const inv = codec.premultiply ? 1 / alpha : 1;
    for (let c = 0; c < a; c++) out[outAt + p + c] = codec.fromWork(src[srcAt + p + c] * inv);
  }
}
