/**
 * The optional WebAssembly SIMD 2-D FFT (assembly/spectrum.ts, f64x2), the twin of
 * fft2dBitReversed (fft2d.ts), which stays the reference: the same operations in the same
 * order, so the same values bit for bit. Its arrays live in the module's own memory, laid out
 * once for the largest tile, so the views handed out are never detached.
 */
import type { WasmMemory } from '../simd/kernels.js';
import type { FftPlan } from './fft.js';
import { SPECTRUM_WASM_BASE64 } from './wasm-bytes.js';

interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Memory: new (d: { initial: number }) => WasmMemory;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (m: object, imports: object) => { exports: Record<string, unknown> };
}
type Fft2d = (re: number, im: number, cos: number, sin: number, n: number) => void;

/** Largest side the memory is laid out for (tiles.ts's largest tile). */
const MAX_SIDE = 128;
/** First byte used: the low kilobyte is left to the module's own data. */
const BASE = 1024;
const RE = BASE;
const IM = RE + MAX_SIDE * MAX_SIDE * 8;
const COS = IM + MAX_SIDE * MAX_SIDE * 8;
const SIN = COS + MAX_SIDE * 8;
const END = SIN + MAX_SIDE * 8;

/** One size's transform: fill `re` and `im` (bit-reversed on both axes), then call `run`. */
export interface SimdFft2d {
  readonly re: Float64Array;
  readonly im: Float64Array;
  run(): void;
}

interface Module {
  buffer: ArrayBuffer;
  fft2d: Fft2d;
  size: number;
}

let enabled = true;
let module: Module | null | undefined;

function instantiate(): Module | null {
  const bin = atob(SPECTRUM_WASM_BASE64);
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  const wasm = (globalThis as unknown as { WebAssembly?: WasmApi }).WebAssembly;
  // Engines without WebAssembly SIMD reject the module: the scalar transform serves then.
  if (!wasm || !wasm.validate(bytes)) return null;
  const memory = new wasm.Memory({ initial: Math.ceil(END / 65536) });
  const inst = new wasm.Instance(new wasm.Module(bytes), { env: { memory } });
  return { buffer: memory.buffer, fft2d: inst.exports.fft2dBitReversed as Fft2d, size: 0 };
}

const views = new Map<number, SimdFft2d>();

/**
 * The SIMD transform for `plan` (sizes 4..128), or null when disabled, unsupported or out of
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
    const cos = new Float64Array(m.buffer, COS, n);
    const sin = new Float64Array(m.buffer, SIN, n);
    view = {
      re,
      im,
      run() {
        if (m.size !== n) {
          cos.set(plan.cos.subarray(0, n));
          sin.set(plan.sin.subarray(0, n));
          m.size = n;
        }
        m.fft2d(RE, IM, COS, SIN, n);
      },
    };
    views.set(n, view);
  }
  return view;
}

/** Turns the SIMD transform off or on (the scalar one is the reference; tests compare both). */
export function setSpectrumSimdEnabled(on: boolean): void {
  enabled = on;
}
