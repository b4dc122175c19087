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
 * job started afterwards waits until `release`.
 *
 * `release` cannot race the readers: it opens each FIFO read-write, which on Linux never blocks
 * and never fails (fifo(7)), and keeps that end open until every reader's open has returned.
 * A reader whose open is already blocked wakes up; one whose open has not reached a pool thread
 * yet finds a writer present and returns at once. (A write-only O_NONBLOCK open instead fails
 * with ENXIO when no reader has opened yet, which is what made this helper flaky.)
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
        const ends = fifos.map((f) => openSync(f, constants.O_RDWR));
        try {
          for (const r of readers) await (await r).close();
        } finally {
          for (const fd of ends) closeSync(fd);
        }
      })();
      return released;
    },
  };
}
