/**
 * mulberry32: a small 32-bit seeded generator (Tommy Ettinger, public domain, 2017). The
 * demo pictures must be the same bytes on every machine, so no Math.random anywhere.
 * Returns floats in [0, 1).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** n values of `rand()` for per-thread or per-brick variation, indexed cheaply in loops. */
export function randomTable(rand: () => number, n: number): Float32Array {
  const t = new Float32Array(n);
  for (let i = 0; i < n; i++) t[i] = rand();
  return t;
}
