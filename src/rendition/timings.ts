import { epochNow, type Mark, tracing } from '../pool/trace.js';

/** Stages of one rendition, as Server-Timing and the metrics name them ('stream': decode and resample overlapped). */
export type Stage = 'origin' | 'decode' | 'plan' | 'resample' | 'stream' | 'encode' | 'cache';

export interface StageTiming {
  stage: Stage;
  ms: number;
}

/** Times the stages of one render; `observe` also feeds them to metrics. */
export class StageClock {
  readonly timings: StageTiming[] = [];
  /** With FOLDWISE_TIMELINE=1 (src/pool/trace.ts): spans on every thread, for scripts/bench/timeline.ts. */
  readonly marks: Mark[] = [];

  constructor(private readonly observe?: (stage: Stage, seconds: number) => void) {}

  async time<T>(stage: Stage, work: () => Promise<T> | T): Promise<T> {
    const start = performance.now();
    const at = tracing ? epochNow() : 0;
    try {
      return await work();
    } finally {
      this.record(stage, performance.now() - start);
      if (tracing) this.span(stage, 'main', at);
    }
  }

  /** Notes a span of `what` on `thread` from `start` (epochNow) to now; only when tracing. */
  span(what: string, thread: string, start: number): void {
    if (tracing) this.marks.push({ what, thread, start, end: epochNow() });
  }

  record(stage: Stage, ms: number): void {
    this.timings.push({ stage, ms });
    this.observe?.(stage, ms / 1000);
  }
}

/**
 * The Server-Timing header (W3C Server Timing): the cache outcome with the time spent in cache
 * tiers, then each stage's total duration in milliseconds, in the order the stages ran.
 */
export function serverTiming(cache: string, timings: readonly StageTiming[]): string {
  // Plain loops: this runs on every hit, where a Map and array copies showed up in profiles.
  let cacheMs = 0;
  const stages: Stage[] = [];
  const totals: number[] = [];
  for (const t of timings) {
    if (t.stage === 'cache') {
      cacheMs += t.ms;
      continue;
    }
    const i = stages.indexOf(t.stage);
    if (i < 0) {
      stages.push(t.stage);
      totals.push(t.ms);
    } else totals[i] += t.ms;
  }
  let header = `cache;desc="${cache}";dur=${cacheMs.toFixed(2)}`;
  for (let i = 0; i < stages.length; i++) header += `, ${stages[i]};dur=${totals[i].toFixed(2)}`;
  return header;
}
