import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Counter, Gauge } from 'prom-client';
import { errorCodes } from '../../errors.js';
import type { CallbackOutcome } from '../../ingest/callback-sender.js';
import { IngestQueue } from '../../ingest/queue.js';
import { toFoldwiseError } from './errors.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** Async ingest jobs shared by every replica (BullMQ on Redis); null without Redis. */
    ingestQueue: IngestQueue | null;
  }
}

/** A failure as a job shows it: code and a sentence; a 5xx shows only its title. */
export function describeFailure(e: unknown): { code: string; detail: string; status: number } {
  const fw = toFoldwiseError(e);
  return { code: fw.code, detail: fw.status >= 500 ? errorCodes[fw.code].title : fw.message, status: fw.status };
}

/**
 * With cache.redisUrl set, `Prefer: respond-async` jobs go on a BullMQ queue in the same Redis
 * (keys under redis.namespace + "q"), and this replica's worker runs its share of them through
 * the ingest service. Without Redis the in-process table (ingest.jobs) stays. At shutdown the
 * worker gets the rest of the shutdown deadline for its running jobs, then hands the
 * unfinished ones back to the queue, where another replica picks them up at once.
 */
async function ingestQueuePlugin(app: FastifyInstance): Promise<void> {
  const { config, ingest } = app;
  const url = config.cache.redisUrl;
  if (!url) {
    app.decorate('ingestQueue', null);
    return;
  }
  const { ingest: settings } = config;
  const queue = new IngestQueue(
    {
      url,
      prefix: `${config.redis.namespace}q`,
      maxJobs: settings.maxJobs,
      resultSeconds: settings.jobResultSeconds,
      lockMs: settings.jobLockMs,
      concurrency: settings.concurrency,
      attempts: settings.jobAttempts,
      timeoutMs: config.redis.connectTimeoutMs,
    },
    (work) => ingest.run(ingest.fromQueued(work.key, work.source, work.options)).value,
    describeFailure,
    // The callback is queued inside the job, before its end is recorded (at least once).
    async (job, work, end) => {
      if (!work.callback) return;
      const outcome: CallbackOutcome = { job: job.id, state: end.state, finishedAt: new Date().toISOString() };
      if (end.state === 'done') outcome.manifest = end.manifest;
      else outcome.error = end.error;
      await app.callbacks.send(work.callback, outcome, `${job.id}-${job.timestamp}`);
    },
  );
  const settled = new Counter({
    name: 'foldwise_ingest_queue_jobs_total',
    help: 'Queued ingest jobs this replica finished, by outcome.',
    labelNames: ['state'],
    registers: [app.metrics.registry],
  });
  new Gauge({
    name: 'foldwise_ingest_queue_running',
    help: 'Queued ingest jobs this replica runs now.',
    registers: [app.metrics.registry],
    collect() {
      this.set(queue.runningCount);
    },
  });
  queue.on('settled', (_id: string, state: 'done' | 'failed') => settled.inc({ state }));
  // A callback is delivered once the job's end is recorded, so a poll on receipt agrees with it.
  app.callbacks.ended = (id) => queue.ended(id);
  // BullMQ reconnects by itself; the errors are logged, rate-limited by the link's own pace.
  queue.on('redis-error', (e: Error) => app.log.warn({ err: e.message }, 'ingest queue: Redis error'));
  app.decorate('ingestQueue', queue);

  const { deadlineMs } = config.shutdown;
  const budget = deadlineMs - Math.min(1000, deadlineMs / 10);
  let closingSince = 0;
  app.addHook('preClose', async () => {
    closingSince = performance.now();
    queue.accepting = false;
  });
  app.addHook('onClose', async () => {
    const left = budget - (performance.now() - (closingSince || performance.now()));
    const handed = await queue.close(left);
    if (handed.length > 0) app.log.warn({ jobs: handed }, 'ingest jobs unfinished at the shutdown deadline, handed back to the queue');
  });
}

export default fp(ingestQueuePlugin, {
  name: 'foldwise-ingest-queue',
  fastify: '5.x',
  dependencies: ['foldwise-context', 'foldwise-metrics', 'foldwise-ingest', 'foldwise-callbacks'],
});
