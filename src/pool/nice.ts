/**
 * The pool's threads yield to the rest of the process when the cores are short. On two cores a
 * first rendition keeps three threads busy (libvips decoding into the spool file, a worker
 * resampling the rows as they come, another analysing them), and the decode is the one the
 * answer waits for: with the workers at the same priority the decode of a 4 MP JPEG took 40-56
 * ms instead of 29-35 (scripts/bench/timeline.ts). Linux keeps a nice value per thread, so a
 * worker lowers its own (raising it back would need privileges nobody asks for); libvips'
 * decode and encode threads and the event loop keep theirs. The CPU stays as busy: only who
 * waits changes. It is a trade (pool.threadNice, 0 by default): on a replica with spare
 * requests' worth of CPU, nice 10 made a 14.7 MP first rendition 1.94x -> 1.72x sharp's decode
 * and the event-loop lag p99 20.3 -> 17.4 ms (`npm run bench -- --service-only`, 15 runs each,
 * interleaved); under a flood (load/miss-mix.ts --connections 16 --thread-nice 10) the event
 * loop, first in line, answered 503s four times as fast and the renders done halved (78-91 -> 45).
 */
import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';

/** This thread's id for the kernel (Linux: /proc/thread-self is <pid>/task/<tid>); undefined elsewhere. */
export function threadTid(): number | undefined {
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    return Number.isInteger(tid) && tid > 0 ? tid : undefined;
  } catch {
    return undefined;
  }
}

/** Lowers the calling thread's priority to nice `n` (0..19); false where threads have no nice of their own or it failed. */
export function niceThread(n: number): boolean {
  if (!(n > 0)) return false;
  const tid = threadTid();
  if (tid === undefined) return false;
  try {
    setPriority(tid, Math.min(19, Math.floor(n)));
    return true;
  } catch {
    return false;
  }
}
