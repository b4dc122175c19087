import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';

export interface MemoryWatchOptions {
  /** Resident memory ceiling in bytes; 0 = no watch. */
  maxRssBytes: number;
  /** How long RSS may stay above the ceiling with nothing admitted before /healthz fails. */
  stuckAfterMs: number;
  sampleIntervalMs: number;
}

declare module 'fastify' {
  interface FastifyInstance {
    /** Why the process cannot get back under its memory ceiling, or null while it can (for /healthz). */
    memoryStuck(): string | null;
  }
}

/**
 * Watches whether memory comes back down. While jobs are admitted a high RSS is their work
 * and ends with them; RSS above the ceiling for `stuckAfterMs` with no job admitted means the
 * process cannot recover by itself (a leak, fragmentation), so /healthz fails and an
 * orchestrator restarts the replica instead of leaving it refusing work. Also reports the
 * memory budget on /metrics.
 */
async function memoryWatchPlugin(app: FastifyInstance, opts: MemoryWatchOptions): Promise<void> {
  const pool = app.renderPool;
  let overSince: number | null = null;
  let lastRss = 0;
  const sample = () => {
    lastRss = process.memoryUsage.rss();
    const idle = pool.memory().running === 0;
    if (opts.maxRssBytes > 0 && lastRss > opts.maxRssBytes && idle) overSince ??= Date.now();
    else overSince = null;
  };
  const timer = setInterval(sample, opts.sampleIntervalMs);
  timer.unref();
  app.addHook('onClose', async () => clearInterval(timer));
  app.decorate('memoryStuck', () => {
    if (overSince === null || Date.now() - overSince < opts.stuckAfterMs) return null;
    const mib = (b: number) => (b / 2 ** 20).toFixed(0);
    return `resident memory ${mib(lastRss)} MiB has stayed above ${mib(opts.maxRssBytes)} MiB for ${((Date.now() - overSince) / 1000).toFixed(0)} s with no job admitted`;
  });

  const registers = [app.metrics.registry];
  const fields = [
    ['foldwise_memory_admitted_bytes', 'Estimated peak bytes of the jobs admitted now.', 'admittedBytes'],
    ['foldwise_memory_budget_bytes', 'The memory budget jobs are admitted against.', 'budgetBytes'],
    ['foldwise_memory_waiting_jobs', 'Jobs waiting for room in the memory budget.', 'waiting'],
    ['foldwise_memory_spool_bytes', 'Bytes of spool files (/dev/shm): of decodes in progress (part of the admitted bytes) and of finished decodes kept (cache.decodedBytes).', 'spoolBytes'],
  ] as const;
  for (const [name, help, field] of fields) {
    new Gauge({ name, help, registers, collect() { this.set(pool.memory()[field]); } });
  }
}

export default fp(memoryWatchPlugin, { name: 'foldwise-memory-watch', fastify: '5.x', dependencies: ['foldwise-metrics', 'foldwise-worker-pool'] });
