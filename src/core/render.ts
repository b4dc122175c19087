import type { PixelRaster, Plan } from './types.js';
import { rowCodec, decodeRow, encodeRow } from './color/index.js';
import { planTable, resampleStrips, type RowSource } from './resample/index.js';

/** Options of {@link renderRaster}. */
export interface RenderOptions {
  /** Render only output rows [start, end); the result is then end - start rows high. */
  rows?: [number, number];
}

function isOpaque(data: Uint8Array | Uint16Array, channels: number, max: number): boolean {
  for (let i = channels - 1; i < data.length; i += channels) if (data[i] !== max) return false;
  return true;
}

function checkSource(src: PixelRaster, plan: Plan): void {
  const { width, height, channels, data } = src;
  if (width !== plan.sourceWidth || height !== plan.sourceHeight) {
    throw new RangeError(`source is ${width}x${height} but the plan is for ${plan.sourceWidth}x${plan.sourceHeight}`);
  }
  if (!(channels >= 1 && channels <= 4 && Number.isInteger(channels))) throw new RangeError(`bad channel count ${channels}`);
  if (!(data instanceof Uint8Array || data instanceof Uint16Array)) throw new RangeError('data must be a Uint8Array or Uint16Array');
  if (data.length !== width * height * channels) throw new RangeError('data length does not match width x height x channels');
}

/**
 * Renders the plan's target from `src`: decode to linear light (or keep encoded values when
 * the plan says light=encoded), premultiply alpha, separable resample through the plan's
 * weight tables, unpremultiply, encode with correct rounding. Output has the source's channels
 * and bit depth. With `rows`, only that band of output rows is produced, so workers can share
 * one source. Pure: reads src, returns a new raster.
 */
export function renderRaster(src: PixelRaster, plan: Plan, opts: RenderOptions = {}): PixelRaster {
  checkSource(src, plan);
  const [r0, r1] = opts.rows ?? [0, plan.targetHeight];
  if (!(Number.isInteger(r0) && Number.isInteger(r1) && r0 >= 0 && r0 <= r1 && r1 <= plan.targetHeight)) {
    throw new RangeError(`rows must satisfy 0 <= start <= end <= ${plan.targetHeight}`);
  }
  const { data, channels, width } = src;
  const deep = data instanceof Uint16Array;
  const max = deep ? 65535 : 255;
  const hasAlpha = channels === 2 || channels === 4;
  const codec = rowCodec(deep, channels, plan.light === 'linear', hasAlpha && !isOpaque(data, channels, max));
  const dstW = plan.targetWidth;
  const out = deep ? new Uint16Array(dstW * (r1 - r0) * channels) : new Uint8Array(dstW * (r1 - r0) * channels);
  const rowSize = width * channels;
  const source: RowSource = {
    width,
    height: src.height,
    lanes: channels,
    read: (y, buf, at) => decodeRow(codec, data, y * rowSize, width, buf, at),
  };
  const outRow = dstW * channels;
  resampleStrips(source, planTable(plan, 'x'), planTable(plan, 'y'), r0, r1, (o, row, at) =>
    encodeRow(codec, row, at, dstW, out, (o - r0) * outRow),
  );
  return { data: out, width: dstW, height: r1 - r0, channels };
}
