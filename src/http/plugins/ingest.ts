import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Counter, Gauge } from 'prom-client';
import { IngestService, type RenditionEvent } from '../../ingest/service.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The upload hook's service: manifests, the content-addressed store, async jobs. */
    ingest: IngestService;
  }
}

/**
 * Creates the ingest service once, on the app's render context and configuration, and counts
 * its work in the app's metrics registry: renditions by cache outcome, analyses, and jobs.
 * At shutdown it drains the accepted async jobs (drainOnClose).
 */
async function ingestPlugin(app: FastifyInstance): Promise<void> {
  const ingest = new IngestService(app.config, app.renderContext, app.spectra);
  const registers = [app.metrics.registry];
  const renditions = new Counter({
    name: 'foldwise_ingest_renditions_total',
    help: 'Renditions made or found by ingest, by cache outcome (miss = rendered now).',
    labelNames: ['cache'],
    registers,
  });
  const analyses = new Counter({ name: 'foldwise_ingest_analyses_total', help: 'Source spectra analysed by ingest.', registers });
  new Gauge({
    name: 'foldwise_ingest_jobs',
    help: 'Asynchronous ingest jobs in the table (finished ones until evicted).',
    registers,
    collect() {
      this.set(ingest.jobs.size);
    },
  });
  ingest.on('rendition', (e: RenditionEvent) => renditions.inc({ cache: e.cache.startsWith('hit') ? 'hit' : 'miss' }));
  ingest.on('analysed', () => analyses.inc());
  app.decorate('ingest', ingest);
  drainOnClose(app, ingest);
}

/**
 * Shutdown: from the moment the app starts closing (preClose) no new async job is accepted;
 * before the worker pool and cache tiers close (this plugin's onClose runs before theirs, as
 * it is registered after them) the accepted jobs get the rest of the shutdown deadline to
 * finish, less a margin for closing the rest. A job still unfinished is marked failed
 * (ERR_INGEST_ABANDONED) and logged with its id, never dropped silently.
 */
function drainOnClose(app: FastifyInstance, ingest: IngestService): void {
  const { deadlineMs } = app.config.shutdown;
  const budget = deadlineMs - Math.min(1000, deadlineMs / 10);
  let closingSince = 0;
  app.addHook('preClose', async () => {
    closingSince = performance.now();
    ingest.jobs.accepting = false;
  });
  app.addHook('onClose', async () => {
    const left = budget - (performance.now() - (closingSince || performance.now()));
    const abandoned = await ingest.jobs.drain(left, {
      code: 'ERR_INGEST_ABANDONED',
      detail: 'the service stopped before this job finished; send the upload again',
    });
    if (abandoned.length > 0) {
      app.log.error({ jobs: abandoned.map((j) => j.id), code: 'ERR_INGEST_ABANDONED' }, 'ingest jobs unfinished at the shutdown deadline, marked failed');
    }
  });
}

export default fp(ingestPlugin, {
  name: 'foldwise-ingest',
  fastify: '5.x',
  dependencies: ['foldwise-context', 'foldwise-metrics', 'foldwise-render', 'foldwise-spectra'],
});
