import { execFileSync } from 'node:child_process';
import { closeSync, constants, openSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { join } from 'node:path';

/** Every thread of libuv's pool held busy, as by sharp's decodes and encodes under load. */
export interface BusyThreadpool {
  /** Lets the threads go (idempotent); asynchronous fs calls queued meanwhile then run. */
  release(): Promise<void>;
}

/**
 * Occupies all UV_THREADPOOL_SIZE (default 4) threads of libuv's pool: each is held in the
 * open(2) of a FIFO in `dir` that has no writer yet (POSIX: a read-only open of a FIFO blocks
 * until a writer opens it). The opens are queued first, so any asynchronous fs call or sharp
 * job started afterwards waits until `release`, which opens the writer ends without blocking.
 */
export function occupyThreadpool(dir: string): BusyThreadpool {
  const n = Number(process.env.UV_THREADPOOL_SIZE) || 4;
  const fifos = Array.from({ length: n }, (_, i) => join(dir, `busy-${process.pid}-${i}.fifo`));
  execFileSync('mkfifo', fifos);
  const readers = fifos.map((f) => open(f, 'r'));
  let released: Promise<void> | undefined;
  return {
    release() {
      released ??= (async () => {
        for (const f of fifos) closeSync(openSync(f, constants.O_WRONLY | constants.O_NONBLOCK));
        for (const r of readers) await (await r).close();
      })();
      return released;
    },
  };
}
