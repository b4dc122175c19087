/** The part of the WebAssembly JS API used here (the project's lib settings carry no DOM types). */
export interface WasmMemory {
  readonly buffer: ArrayBuffer;
  grow(pages: number): number;
}
interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Memory: new (d: { initial: number }) => WasmMemory;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (m: object, imports: object) => { exports: Record<string, unknown> };
}

/**
 * Instantiates an embedded module (base64) on a memory of `pages` 64 KiB pages, imported as
 * env.memory; null on engines without WebAssembly or without its SIMD, which reject the
 * module (the TypeScript loops serve then).
 */
export function instantiateWasm(base64: string, pages: number): { memory: WasmMemory; exports: Record<string, unknown> } | null {
  const bin = atob(base64);
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  const wasm = (globalThis as unknown as { WebAssembly?: WasmApi }).WebAssembly;
  if (!wasm || !wasm.validate(bytes)) return null;
  const memory = new wasm.Memory({ initial: pages });
  const inst = new wasm.Instance(new wasm.Module(bytes), { env: { memory } });
  return { memory, exports: inst.exports };
}
