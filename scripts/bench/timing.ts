/** Timing of benchmark steps: medians after one warm-up, wall and process CPU time. */

export interface Timing {
  /** Median wall time, ms. */
  wall: number;
  /** Median process CPU time (all threads: libvips', workers'), ms. */
  cpu: number;
  /** Fastest wall time, ms: the least disturbed by other work on a shared machine. */
  best: number;
}

/** Times `runs` calls of `fn` after one warm-up (JIT, tables, codec init). */
export async function timeRuns(runs: number, fn: () => unknown): Promise<Timing> {
  await fn();
  const walls: number[] = [];
  const cpus: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c = process.cpuUsage();
    const t = performance.now();
    await fn();
    walls.push(performance.now() - t);
    const used = process.cpuUsage(c);
    cpus.push((used.user + used.system) / 1000);
  }
  const mid = (v: number[]) => v.sort((a, b) => a - b)[runs >> 1];
  return { wall: mid(walls), cpu: mid(cpus), best: Math.min(...walls) };
}
