import type { PixelRaster, Plan } from '../types.js';
import { rowCodec } from '../color/index.js';
import { rasterRows, rowScratchBytes, rowEncoder, encodeScratchBytes, ownRows, type RowAt } from './raster-rows.js';
import { planTable, resampleStream, streamLayout, type RowSource, type WeightTable } from '../resample/index.js';
import { simdKernels, arenaFor, arenaBytes, type Arena } from '../simd/index.js';
import { reduceTable } from '../resample/pyramid.js';
import { fusesReduce, reducedRows, reducedRowsFloats } from './reduced-rows.js';

/** Options of {@link renderRaster}. */
export interface RenderOptions {
  /** Render only output rows [start, end); the result is then end - start rows high. */
  rows?: [number, number];
  /**
   * Where each source row is, instead of `src.data` (whose length is then not checked, and
   * may be 0): for rows read from elsewhere as they are needed, such as a file a decoder is
   * still writing. Asked in non-decreasing order, each row at most once, only those needed (a
   * band skips the rows above it); a span need stay valid only until the next call. Sources
   * with alpha are refused with it, since their opacity check would read every row first.
   */
  rowAt?: RowAt;
  /**
   * Asked before each output row o after the band's first: false ends the band there, so the
   * result holds rows [start, o). For a band another thread may shorten while it runs (the
   * pool hands the rest of a lagging band to an idle thread); the rows made are unchanged.
   */
  more?: (o: number) => boolean;
  /**
   * Where the rows go, instead of a new array: at least (end - start) x targetWidth x channels
   * samples of the source's sample type (a worker writes its band straight into the shared
   * output). The result's data is then a view of it.
   */
  into?: Uint8Array | Uint16Array;
}

function isOpaque(data: Uint8Array | Uint16Array, channels: number, max: number): boolean {
  for (let i = channels - 1; i < data.length; i += channels) if (data[i] !== max) return false;
  return true;
}

/**
 * With the SIMD kernels available, an arena big enough for every buffer and table copy of the
 * render (each pass's window and lines, the output line), else null.
 */
function simdArena(
  passes: ReadonlyArray<[WeightTable, WeightTable, number, number]>,
  width: number,
  lanes: number,
  dstW: number,
  scratchBytes: number,
  fusedFloats: number,
): Arena | null {
  const k = simdKernels();
  if (!k) return null;
  // The scratch is up to five areas (codes and tables), each padded and aligned on its own.
  const counts: number[] = [dstW * lanes, Math.ceil(scratchBytes / 4) + 40, fusedFloats];
  let w = width;
  for (const [i, [tx, ty, a, b]] of passes.entries()) {
    // A fused first stage reads rows already reduced along x (reduced-rows.ts).
    counts.push(...streamLayout(fusedFloats > 0 && i === 0 ? tx.dstLen : w, lanes, fusedFloats > 0 && i === 0 ? null : tx, ty, a, b, true).sizes);
    for (const t of [tx, ty]) counts.push(t.dstLen, t.weights.length, t.lobe ? t.lobe.length : 0);
    w = tx.dstLen;
  }
  return arenaFor(k, arenaBytes(counts));
}

/** A copy of the table whose start, weights and lobes live in the arena, marked for the SIMD loops. */
function placed(arena: Arena, t: WeightTable): WeightTable {
  const start = arena.ints(t.dstLen);
  start.set(t.start);
  const weights = arena.floats(t.weights.length);
  weights.set(t.weights);
  if (!t.lobe) return { ...t, start, weights, simd: simdKernels()! };
  const lobe = arena.ints(t.lobe.length);
  lobe.set(t.lobe);
  return { ...t, start, weights, lobe, simd: simdKernels()! };
}

/** The reduce-by-2 tables of each pyramid level, (x, y); an axis with fewer levels is copied. */
function pyramidStages(plan: Plan, width: number, height: number): Array<[WeightTable, WeightTable]> {
  const levels = Math.max(plan.x.pyramidLevels, plan.y.pyramidLevels);
  const stages: Array<[WeightTable, WeightTable]> = [];
  let w = width;
  let h = height;
  for (let l = 0; l < levels; l++) {
    const bx = reduceTable(w, l < plan.x.pyramidLevels);
    const by = reduceTable(h, l < plan.y.pyramidLevels);
    stages.push([bx, by]);
    w = bx.dstLen;
    h = by.dstLen;
  }
  return stages;
}

function checkSource(src: PixelRaster, plan: Plan, rowsElsewhere: boolean): void {
  const { width, height, channels, data } = src;
  if (width !== plan.sourceWidth || height !== plan.sourceHeight) {
    throw new RangeError(`source is ${width}x${height} but the plan is for ${plan.sourceWidth}x${plan.sourceHeight}`);
  }
  if (!(channels >= 1 && channels <= 4 && Number.isInteger(channels))) throw new RangeError(`bad channel count ${channels}`);
  if (!(data instanceof Uint8Array || data instanceof Uint16Array)) throw new RangeError('data must be a Uint8Array or Uint16Array');
  if (!rowsElsewhere && data.length !== width * height * channels) throw new RangeError('data length does not match width x height x channels');
}

/**
 * Renders the plan's target from `src`: decode to linear light (or keep encoded values when
 * the plan says light=encoded), premultiply alpha, reduce through the plan's pyramid levels,
 * separable resample through the final weight tables, unpremultiply, encode with correct
 * rounding. Every stage streams rows through a small window, so no full float copy of the
 * source or of a level exists. Output has the source's channels and bit depth. With `rows`,
 * only that band of output rows is produced, so workers can share one source. Pure: reads
 * src, returns a new raster (SIMD kernels, where available, work in a per-thread arena).
 */
export function renderRaster(src: PixelRaster, plan: Plan, opts: RenderOptions = {}): PixelRaster {
  checkSource(src, plan, opts.rowAt !== undefined);
  const [r0, r1] = opts.rows ?? [0, plan.targetHeight];
  if (!(Number.isInteger(r0) && Number.isInteger(r1) && r0 >= 0 && r0 <= r1 && r1 <= plan.targetHeight)) {
    throw new RangeError(`rows must satisfy 0 <= start <= end <= ${plan.targetHeight}`);
  }
  const { data, channels, width } = src;
  const deep = data instanceof Uint16Array;
  const max = deep ? 65535 : 255;
  const hasAlpha = channels === 2 || channels === 4;
  if (hasAlpha && opts.rowAt) throw new RangeError('rowAt serves sources without alpha');
  const codec = rowCodec(deep, channels, plan.light === 'linear', hasAlpha && !isOpaque(data, channels, max));
  const rowAt = opts.rowAt ?? ownRows(src);
  const dstW = plan.targetWidth;
  const samples = dstW * (r1 - r0) * channels;
  const { into } = opts;
  if (into && ((into instanceof Uint16Array) !== deep || into.length < samples)) {
    throw new RangeError(`into must hold ${samples} ${deep ? '16' : '8'}-bit samples`);
  }
  const out = into ?? (deep ? new Uint16Array(samples) : new Uint8Array(samples));
  const ty = planTable(plan, 'y');
  const stages = pyramidStages(plan, width, src.height);
  // Rows each stage must produce for output rows [r0, r1), from the last stage back.
  const spans: Array<[number, number]> = [];
  let span: [number, number] = r1 > r0 ? [ty.start[r0], ty.start[r1 - 1] + ty.taps] : [0, 0];
  for (let i = stages.length - 1; i >= 0; i--) {
    spans[i] = span;
    const by = stages[i][1];
    span = span[1] > span[0] ? [by.start[span[0]], by.start[span[1] - 1] + by.taps] : [0, 0];
  }
  const passes: Array<[WeightTable, WeightTable, number, number]> = stages.map(([bx, by], i) => [bx, by, spans[i][0], spans[i][1]]);
  passes.push([planTable(plan, 'x'), ty, r0, r1]);
  const scratch = rowScratchBytes(src, codec) + encodeScratchBytes(codec, dstW * channels);
  const fused = stages.length > 0 && fusesReduce(src, codec, stages[0][0], simdKernels() !== null);
  const arena = simdArena(passes, width, channels, dstW, scratch, fused ? reducedRowsFloats(src) : 0);
  const alloc = arena ? arena.floats : (n: number) => new Float32Array(n);
  const simd = arena ? { k: simdKernels()!, arena } : undefined;
  let source: RowSource | undefined;
  for (const [bx, by, a, b] of passes) {
    const tx = arena ? placed(arena, bx) : bx;
    const ty = arena ? placed(arena, by) : by;
    // The first pyramid stage's x reduce fused with the decode (reduced-rows.ts), or the plain rows.
    if (!source && fused) source = resampleStream(reducedRows(src, codec, tx, simd!, rowAt), null, ty, a, b, alloc);
    else source = resampleStream(source ?? rasterRows(src, codec, simd, rowAt), tx, ty, a, b, alloc);
  }
  const final = source!;
  const line = alloc(dstW * channels);
  const emit = rowEncoder(codec, out, dstW, r0, simd);
  const more = opts.more;
  let o = r0;
  for (; o < r1; o++) {
    if (more && o > r0 && !more(o)) break;
    final.read(o, line, 0);
    emit(o, line);
  }
  return { data: o === r1 && !into ? out : out.subarray(0, dstW * (o - r0) * channels), width: dstW, height: o - r0, channels };
}
