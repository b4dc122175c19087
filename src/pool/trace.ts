/**
 * Opt-in timeline marks of one render (FOLDWISE_TIMELINE=1, off by default): spans of work on
 * each thread, in milliseconds since the epoch (performance.timeOrigin + now(), comparable
 * across worker threads), for scripts/bench/timeline.ts. Imports nothing, so the worker
 * threads (worker.ts, analysis.ts) can use it; the main thread collects them (trace-scope.ts).
 */

/** Whether this process records marks; worker threads inherit the variable. */
export const tracing = typeof process !== 'undefined' && process.env.FOLDWISE_TIMELINE === '1';

/** A span of work `what` on `thread` ('main', 'decode', 'w<threadId>'), from `start` to `end`. */
export interface Mark {
  what: string;
  thread: string;
  start: number;
  end: number;
}

/** Now, in milliseconds since the epoch, with sub-millisecond precision. */
export function epochNow(): number {
  return performance.timeOrigin + performance.now();
}

/** Waits merged into spans when less than this apart (ms): a reader polling a file waits 1 ms at a time. */
const MERGE_MS = 0.5;
/** At most this many wait spans per reader. */
const MAX_SPANS = 256;

/** Spans a reader spent waiting (for rows not yet written), merged when close together. */
export class WaitSpans {
  readonly spans: Array<[number, number]> = [];

  add(start: number, end: number): void {
    const last = this.spans[this.spans.length - 1];
    if (last && start - last[1] < MERGE_MS) last[1] = end;
    else if (this.spans.length < MAX_SPANS) this.spans.push([start, end]);
  }

  /** The spans as marks of `what` on `thread`. */
  marks(what: string, thread: string): Mark[] {
    return this.spans.map(([start, end]) => ({ what, thread, start, end }));
  }
}
