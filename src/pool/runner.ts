import type { Piscina } from 'piscina';
import type { BandOutcome, ResampleTask } from './worker.js';

/** The pool's piscina: worker.ts's band tasks and their typed outcomes. */
export type BandPiscina = Piscina<ResampleTask, BandOutcome>;

/** One band task run on a worker thread, with its abort signal (and, in a fault test, another worker file). */
export type RunBand = (task: ResampleTask, options: { signal: AbortSignal; filename?: string }) => Promise<BandOutcome>;

/**
 * How the pool runs its band tasks: given the pool's piscina, the run it uses. The default is
 * piscina's own run; a fault test injects another (RenderPoolOptions.runner, build's
 * `poolRunner`) to hold a task, run a crashing module or end a thread, instead of patching
 * the pool's private fields.
 */
export type BandRunner = (piscina: BandPiscina) => RunBand;

export const piscinaRunner: BandRunner = (piscina) => (task, options) => piscina.run(task, options);
