/**
 * The main thread's side of the pool's warm start (RenderPool.warm, what /readyz waits for):
 * every thread runs worker-side warm.ts at once, and this thread runs sharp's codecs once.
 */
import { warmCodecs } from '../codec/warm.js';
import type { SpoolDir } from './spool/dir.js';

/**
 * Resolves once `threads` warm tasks (run by `runWarm`, which the pool routes to its named
 * task) have ended and sharp's codecs ran here, through the spool folder when there is one (a
 * failure there is the render's to meet: a spool write that fails falls back to decoding in
 * memory). Rejects when a warm task does (the pool closed first).
 */
export async function warmThreads(threads: number, runWarm: (task: object) => Promise<unknown>, spool: SpoolDir | null): Promise<void> {
  const arrived = new SharedArrayBuffer(4);
  const tasks = Array.from({ length: threads }, () => runWarm({ arrived, threads }));
  const file = spool?.path();
  try {
    await Promise.all([warmCodecs(file).catch(() => undefined), ...tasks]);
  } finally {
    await Promise.allSettled(tasks);
    if (file) await spool?.remove(file);
  }
}
