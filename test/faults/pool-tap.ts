/**
 * A fault test's hand on the render pool, injected (build's `poolRunner`, src/pool/runner.ts),
 * not patched in: replace the next band task (kill a worker mid-task, run a crashing module,
 * hold a task), see the pool's threads, wait for a new one. A replacement affects the next
 * task only; the tasks after it run as usual.
 */
import { type BandPiscina, type BandRunner, piscinaRunner, type RunBand } from '../../src/pool/runner.js';
import type { ResampleTask } from '../../src/pool/worker.js';

type Options = Parameters<RunBand>[1];
export type Replacement = (original: RunBand, task: ResampleTask, options: Options) => ReturnType<RunBand>;

export class PoolTap {
  private piscina?: BandPiscina;
  private next?: Replacement;

  /** Pass as `build({ poolRunner: tap.runner })`. */
  readonly runner: BandRunner = (piscina) => {
    this.piscina = piscina;
    const original = piscinaRunner(piscina);
    return (task, options) => {
      const replacement = this.next;
      this.next = undefined;
      return replacement ? replacement(original, task, options) : original(task, options);
    };
  };

  /** Runs the next band task through `replacement(original, task, options)`. */
  nextRun(replacement: Replacement): void {
    this.next = replacement;
  }

  /** Holds the next band task at the pool's door: `reachedPool` once it is there, it runs after `release()`. */
  holdNext(): { reachedPool: Promise<void>; release: () => void } {
    let started!: () => void;
    const reachedPool = new Promise<void>((r) => (started = r));
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    this.nextRun(async (original, task, options) => {
      started();
      await gate;
      return original(task, options);
    });
    return { reachedPool, release };
  }

  /** Resolves when the pool next reports a worker thread ready (piscina's 'workerCreate'). */
  nextWorkerReady(): Promise<void> {
    return new Promise((resolve) => this.pool().once('workerCreate', () => resolve()));
  }

  /** The pool's live worker threads. */
  workers() {
    return this.pool().threads;
  }

  private pool(): BandPiscina {
    if (!this.piscina) throw new Error('the tap is not in a pool: build({ poolRunner: tap.runner })');
    return this.piscina;
  }
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
