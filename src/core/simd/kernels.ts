import { SIMD_WASM_BASE64 } from './bytes.js';
import { instantiateWasm, type WasmMemory } from './load.js';

type Pass = (
  dst: number, dstBase: number, dstStep: number, src: number, srcBase: number, srcStep: number,
  lanes: number, taps: number, start: number, weights: number, o0: number, o1: number,
) => void;
type Reduce = (
  dst: number, dstBase: number, dstStep: number, src: number, srcBase: number, srcStep: number,
  lanes: number, a: number, b: number, c: number, o0: number, o1: number,
) => void;

type Decode = (dst: number, src: number, lut: number, n: number) => void;
type DecodeReduce = (
  dst: number, dstBase: number, dstStep: number, src: number, lut: number,
  lanes: number, a: number, b: number, c: number, o0: number, o1: number,
) => void;
type Limit = (
  dst: number, dstBase: number, dstStep: number, src: number, srcBase: number, srcStep: number,
  lanes: number, lobe: number, o0: number, o1: number, slack: number, crest: number, floorShare: number,
) => void;
type Quantise = (dst: number, src: number, n: number, thresholds: number, start: number, shift: number, base: number) => void;

/** The compiled f32x4 twins of the loops in resample/separable.ts, on one shared memory. */
export interface SimdKernels {
  readonly memory: WasmMemory;
  readonly across: Pass;
  readonly pixels: Pass;
  readonly reduce5: Reduce;
  readonly across5: Reduce;
  readonly decode8: Decode;
  readonly decode16: Decode;
  readonly decodeReduce5: DecodeReduce;
  readonly quantise8: Quantise;
  readonly limit: Limit;
}

let enabled = true;
let kernels: SimdKernels | null | undefined;

function instantiate(): SimdKernels | null {
  const loaded = instantiateWasm(SIMD_WASM_BASE64, 2);
  if (!loaded) return null;
  const { memory } = loaded;
  const e = loaded.exports as unknown as Omit<SimdKernels, 'memory'>;
  const { across, pixels, reduce5, across5, decode8, decode16, decodeReduce5, quantise8, limit } = e;
  return { memory, across, pixels, reduce5, across5, decode8, decode16, decodeReduce5, quantise8, limit };
}

/** The SIMD kernels of this thread, or null when disabled or unsupported. */
export function simdKernels(): SimdKernels | null {
  if (!enabled) return null;
  if (kernels === undefined) kernels = instantiate();
  return kernels;
}

/** Turns the SIMD kernels off or on (the scalar loops are the reference; tests compare both). */
export function setSimdEnabled(on: boolean): void {
  enabled = on;
}
