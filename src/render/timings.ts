/** Stages of one rendition, as Server-Timing and the metrics name them. */
export type Stage = 'origin' | 'decode' | 'plan' | 'resample' | 'encode' | 'cache';

export interface StageTiming {
  stage: Stage;
  ms: number;
}

/** Times the stages of one render; `observe` also feeds them to metrics. */
export class StageClock {
  readonly timings: StageTiming[] = [];

  constructor(private readonly observe?: (stage: Stage, seconds: number) => void) {}

  async time<T>(stage: Stage, work: () => Promise<T> | T): Promise<T> {
    const start = performance.now();
    try {
      return await work();
    } finally {
      this.record(stage, performance.now() - start);
    }
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
  const totals = new Map<Stage, number>([['cache', 0]]);
  for (const t of timings) totals.set(t.stage, (totals.get(t.stage) ?? 0) + t.ms);
  return [...totals]
    .map(([stage, ms]) => (stage === 'cache' ? `cache;desc="${cache}";dur=${ms.toFixed(2)}` : `${stage};dur=${ms.toFixed(2)}`))
    .join(', ');
}
