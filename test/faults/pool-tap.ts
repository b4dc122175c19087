/**
 * Test-side access to the render pool's piscina instance, to inject faults into the real
 * pool (kill a worker mid-task, run a crashing module, hold a task) without any hook in
 * production code. Each tap affects the next call only and then restores the pool.
 */
import type { Piscina } from 'piscina';
import type { RenderPool } from '../../src/pool/render-pool.js';

type Run = Piscina['run'];

function piscinaOf(pool: RenderPool): Piscina {
  return (pool as unknown as { piscina: Piscina }).piscina;
}

/** Replaces the next `run` call with `replacement(original, task, options)`. */
export function tapNextRun(pool: RenderPool, replacement: (original: Run, task: unknown, options: Parameters<Run>[1]) => ReturnType<Run>): void {
  const p = piscinaOf(pool);
  const original = p.run.bind(p) as Run;
  p.run = ((task: unknown, options?: Parameters<Run>[1]) => {
    p.run = original;
    return replacement(original, task, options);
  }) as Run;
}

/** Resolves when the pool next reports a worker thread ready (piscina's 'workerCreate'). */
export function nextWorkerReady(pool: RenderPool): Promise<void> {
  return new Promise((resolve) => piscinaOf(pool).once('workerCreate', () => resolve()));
}

/** The pool's live worker threads. */
export function workersOf(pool: RenderPool) {
  return piscinaOf(pool).threads;
}

/**
 * Resolves once `done()` is true, checking once per event-loop turn, at most `turns` times.
 * A turn count is a time bound in disguise (200 000 idle turns pass in about 0.2 s), so the
 * default is large: a render on a slow shared CI machine must not run out of turns before
 * vitest's own test timeout would speak.
 */
export async function until(done: () => boolean, turns = 20_000_000): Promise<void> {
  for (let i = 0; i < turns; i++) {
    if (done()) return;
    await new Promise((r) => setImmediate(r));
  }
  throw new Error('condition not reached');
}
