/**
 * The main thread's side of the pool's warm start (RenderPool.warm, what /readyz waits for):
 * this thread runs sharp's codecs once, writing a spool file as a streamed render's decode
 * does, then every thread runs worker-side warm.ts at once on that file.
 */
import { WARM_HEIGHT, WARM_WIDTH, warmCodecs } from '../codec/warm.js';
import type { SpoolDir } from './spool/dir.js';
import type { WarmTask } from './warm.js';

/**
 * Resolves once `threads` warm tasks (run by `runWarm`, which the pool routes to its named
 * task) have ended and sharp's codecs ran here, through the spool folder when there is one (a
 * failure there is the render's to meet: a spool write that fails falls back to decoding in
 * memory, and the threads then warm on pixels of their own). Rejects when a warm task does
 * (the pool closed first).
 */
export async function warmThreads(threads: number, runWarm: (task: WarmTask) => Promise<unknown>, spool: SpoolDir | null): Promise<void> {
  const arrived = new SharedArrayBuffer(4);
  const file = spool?.path();
  let tasks: Promise<unknown>[] = [];
  try {
    const spooled = await warmCodecs(file).catch(() => false);
    const source = spooled && file ? { path: file, width: WARM_WIDTH, height: WARM_HEIGHT } : undefined;
    tasks = Array.from({ length: threads }, () => runWarm({ arrived, threads, ...(source ? { spooled: source } : {}) }));
    await Promise.all(tasks);
  } finally {
    await Promise.allSettled(tasks);
    if (file) await spool?.remove(file);
  }
}
