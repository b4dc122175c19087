/** The render pool's options, defaults and memory report (render-pool.ts re-exports them). */
import type { MemoryState } from './budget.js';
import type { BandRunner } from './runner.js';

export interface RenderPoolOptions {
  /** Worker threads; 0 = one per available core. */
  threads: number;
  /** Jobs allowed to wait for memory; null = `queuePerThread` per thread. */
  maxQueue: number | null;
  retryAfterSeconds: number;
  /** The byte budget jobs are admitted against (src/pool/budget.ts); null or absent = sized to the container. */
  memoryBudgetBytes?: number | null;
  /** Longest wait for room in the budget before 503 (and for a place in the line, from the lobby); default 4 s. */
  maxWaitMs?: number;
  /** Requests that may wait, unread, for a place in the line (MemoryBudget.enter); 0 or absent = refused at once. */
  lobby?: number;
  /** Last-resort guard: above this RSS a new job is refused (503) while others still run; 0 or absent = off. */
  rssCeilingBytes?: number;
  /** Spool folder for decodes resampled as they arrive ('auto', a path, or 'off'); default 'off'. */
  spoolDir?: string;
  /**
   * The worker threads' nice value (Linux, per thread: src/pool/nice.ts), so libvips' decode and
   * encode and the event loop go first when the cores are short; 0 or absent = the process's own.
   */
  threadNice?: number;
  /** How band tasks are run on the threads (runner.ts); default piscina's run. Fault tests inject one. */
  runner?: BandRunner;
}

/**
 * The default wait line, per worker thread. Waiting jobs hold no pixels (their source is read,
 * not decoded), so memory is bounded by the budget rather than by this line; a short line
 * keeps few sources read ahead. Requests past it wait unread in the lobby (`lobby`, bounded
 * in count and by maxWaitMs), and past a full lobby get a prompt 503 with Retry-After.
 */
export const queuePerThread = 2;

/** Jobs holding memory at once, per worker thread: one resampling while another decodes or encodes. */
export const runningPerThread = 2;

/** The pool's memory as /readyz, /metrics and tests read it. */
export interface PoolMemory extends MemoryState {
  /**
   * Bytes of spool files (/dev/shm): of decodes in progress, part of admittedBytes, and of
   * finished decodes kept for their next rendition (cache.decodedBytes), which are not.
   */
  spoolBytes: number;
  /** Idle staging buffers kept for reuse (at most `threads` of at most 64 MiB each). */
  stagingIdleBytes: number;
}
