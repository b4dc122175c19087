/**
 * The analysis's optional WebAssembly loops (assembly/spectrum.ts): the f64x2 2-D FFT, twin of
 * fft2dBitReversed (fft2d.ts); the tile luminance of 8-bit RGB and RGBA, twin of
 * windowedTileLuminance (luminance.ts); the packed periodogram's sums, twin of accumulatePacked
 * (periodogram.ts). The TypeScript ones stay the reference: the same operations in the same
 * order, so the same values bit for bit (test/core/spectrum/simd.test.ts). Its arrays live in the module's own memory, laid out
 * once for the largest tile, so the views handed out are never detached.
 */
import { srgbToLinear8 } from '../color/index.js';
import { instantiateWasm } from '../simd/load.js';
import type { PixelRaster } from '../types.js';
import type { FftPlan } from './fft.js';
import { luminanceWeights } from './luminance.js';
import { window2d } from './window.js';
import { SPECTRUM_WASM_BASE64 } from './wasm-bytes.js';

type Fft2d = (re: number, im: number, cos: number, sin: number, n: number) => void;
type Accumulate = (re: number, im: number, t: number, norm: number, power: number, regionPower: number, bins: number, shift: number, baseA: number, baseB: number) => void;
type Luminance = (out: number, src: number, channels: number, size: number, lut: number, w2: number, rev: number, alphaScale: number) => number;

/** Largest side the memory is laid out for (tiles.ts's largest tile). */
const MAX_SIDE = 128;
/** First byte used: the low kilobyte is left to the module's own data. */
const BASE = 1024;
const RE = BASE;
const IM = RE + MAX_SIDE * MAX_SIDE * 8;
const COS = IM + MAX_SIDE * MAX_SIDE * 8;
const SIN = COS + MAX_SIDE * 8;
const SRC = SIN + MAX_SIDE * 8;
const LUT = SRC + MAX_SIDE * MAX_SIDE * 4;
const W2 = LUT + 3 * 256 * 8;
const REV = W2 + MAX_SIDE * MAX_SIDE * 8;
const POWER = REV + MAX_SIDE * 4;
/** Region sums: at most 64 regions (tiles.ts) of (MAX_SIDE / 4)^2 bins (welch.ts). */
const MAX_REGION_CELLS = 64 * (MAX_SIDE / 4) ** 2;
const REGIONS = POWER + MAX_SIDE * MAX_SIDE * 8;
const END = REGIONS + MAX_REGION_CELLS * 8;

/** One tile size's loops: fill `re` and `im` (bit-reversed on both axes), then call `run`. */
export interface SimdFft2d {
  readonly re: Float64Array;
  readonly im: Float64Array;
  run(): void;
  /**
   * windowedTileLuminance of the tile at (x0, y0) into `re` (`into` 0) or `im` (1), with the
   * plan's window and bit reversal; null (nothing written) for rasters other than 8-bit RGB(A).
   */
  luminance(into: 0 | 1, src: PixelRaster, x0: number, y0: number): number | null;
  /** Zeroed sinks in the module's memory for periodogram.ts's PowerSinks (null: too many cells). */
  sinks(regionCells: number): { power: Float64Array; regionPower: Float64Array } | null;
  /** accumulatePacked of the transform in `re`, `im` into the last `sinks`. */
  accumulate(norm: number, bins: number, shift: number, baseA: number, baseB: number): void;
}

interface Module {
  buffer: ArrayBuffer;
  fft2d: Fft2d;
  luminance: Luminance;
  accumulate: Accumulate;
  /** The side whose twiddles, window and bit reversal are in memory (0: none yet). */
  size: number;
  /** The luminance weights the LUT holds. */
  weights: readonly number[] | null;
}

let enabled = true;
let module: Module | null | undefined;

function instantiate(): Module | null {
  const loaded = instantiateWasm(SPECTRUM_WASM_BASE64, Math.ceil(END / 65536));
  if (!loaded) return null;
  const e = loaded.exports;
  return { buffer: loaded.memory.buffer, fft2d: e.fft2dBitReversed as Fft2d, luminance: e.tileLuminance8 as Luminance, accumulate: e.accumulatePacked as Accumulate, size: 0, weights: null };
}

const views = new Map<number, SimdFft2d>();

/**
 * The Wasm loops for `plan`'s size (4..128), or null when disabled, unsupported or out of
 * range. Views of one size share the memory with every other size's: use one at a time (one
 * analysis runs at a time per thread, and it runs synchronously).
 */
export function simdFft2d(plan: FftPlan): SimdFft2d | null {
  const n = plan.size;
  if (!enabled || n < 4 || n > MAX_SIDE) return null;
  if (module === undefined) module = instantiate();
  const m = module;
  if (!m) return null;
  let view = views.get(n);
  if (!view) {
    const re = new Float64Array(m.buffer, RE, n * n);
    const im = new Float64Array(m.buffer, IM, n * n);
    const bytes = new Uint8Array(m.buffer, SRC, n * n * 4);
    const prepare = () => {
      if (m.size === n) return;
      new Float64Array(m.buffer, COS, n).set(plan.cos.subarray(0, n));
      new Float64Array(m.buffer, SIN, n).set(plan.sin.subarray(0, n));
      new Float64Array(m.buffer, W2, n * n).set(window2d(n));
      new Uint32Array(m.buffer, REV, n).set(plan.rev);
      m.size = n;
    };
    view = {
      re,
      im,
      run() {
        prepare();
        m.fft2d(RE, IM, COS, SIN, n);
      },
      luminance(into, src, x0, y0) {
        const { data, width, channels } = src;
        if (!(data instanceof Uint8Array) || (channels !== 3 && channels !== 4)) return null;
        prepare();
        const weights = luminanceWeights(src);
        if (m.weights !== weights) {
          const lut = new Float64Array(m.buffer, LUT, 3 * 256);
          // The products the scalar loop forms (K times the code's linear value), so the sums agree.
          for (let c = 0; c < 3; c++) for (let i = 0; i < 256; i++) lut[c * 256 + i] = weights[c] * srgbToLinear8[i];
          m.weights = weights;
        }
        const rowBytes = n * channels;
        for (let y = 0; y < n; y++) {
          const p = ((y0 + y) * width + x0) * channels;
          bytes.set(data.subarray(p, p + rowBytes), y * rowBytes);
        }
        return m.luminance(into === 0 ? RE : IM, SRC, channels, n, LUT, W2, REV, 1 / 255);
      },
      sinks(regionCells) {
        if (regionCells > MAX_REGION_CELLS) return null;
        const power = new Float64Array(m.buffer, POWER, n * n).fill(0);
        return { power, regionPower: new Float64Array(m.buffer, REGIONS, regionCells).fill(0) };
      },
      accumulate(norm, bins, shift, baseA, baseB) {
        m.accumulate(RE, IM, n, norm, POWER, REGIONS, bins, shift, baseA, baseB);
      },
    };
    views.set(n, view);
  }
  return view;
}

/** Turns the Wasm loops off or on (the TypeScript ones are the reference; tests compare both). */
export function setSpectrumSimdEnabled(on: boolean): void {
  enabled = on;
}
