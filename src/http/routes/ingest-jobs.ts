import type { FastifyInstance } from 'fastify';
import { FoldwiseError } from '../../errors.js';
import type { CallbackOutcome } from '../../ingest/callback-sender.js';
import type { JobView } from '../../ingest/jobs.js';
import type { Manifest } from '../../ingest/manifest.js';
import { queueDown } from '../../ingest/queue-terms.js';
import type { IngestWork } from '../../ingest/service.js';
import { describeFailure } from '../plugins/ingest-queue.js';

/**
 * Starts an asynchronous ingest job: on the shared queue when there is one (and the work can
 * travel: its source is stored), else in this process's table. A callback URL (already checked)
 * is called when the job ends: by the queue's settled event on whichever replica finished it,
 * or here for a job of the table.
 */
export function jobStarter(app: FastifyInstance) {
  const { ingest, config } = app;
  const queue = app.ingestQueue;
  const stopping = () => new FoldwiseError('ERR_SERVICE_STOPPING', 'the service is stopping and takes no new ingest jobs');
  const jobError = (e: unknown) => {
    const { code, detail } = describeFailure(e);
    return { code, detail };
  };

  return async function start(work: IngestWork, callback?: string): Promise<JobView<Manifest> | undefined> {
    if (queue && work.spec) {
      if (!queue.accepting) throw stopping();
      const { source, options } = work.spec;
      return queue.submit({ key: work.key, source, options, callback }).catch((e: unknown) => {
        throw queueDown(e, config.pool.retryAfterSeconds);
      });
    }
    if (!ingest.jobs.accepting) throw stopping();
    const job = ingest.jobs.start((started) => ingest.run(work, started).value, jobError);
    if (job && callback) {
      void ingest.jobs.settled(job.id).then((view) => {
        if (!view || (view.state !== 'done' && view.state !== 'failed')) return;
        const outcome: CallbackOutcome = { job: view.id, state: view.state, finishedAt: view.finishedAt ?? new Date().toISOString() };
        if (view.result) outcome.manifest = view.result;
        if (view.error) outcome.error = view.error;
        return app.callbacks.send(callback, outcome);
      }).catch((err: unknown) => app.log.error({ err, job: job.id }, 'callback could not be sent'));
    }
    return job;
  };
}
