import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Counter, Gauge } from 'prom-client';
import { IngestService, type RenditionEvent } from '../ingest/service.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The upload hook's service: manifests, the content-addressed store, async jobs. */
    ingest: IngestService;
  }
}

/**
 * Creates the ingest service once, on the app's render context and configuration, and counts
 * its work in the app's metrics registry: renditions by cache outcome, analyses, and jobs.
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
}

export default fp(ingestPlugin, {
  name: 'foldwise-ingest',
  fastify: '5.x',
  dependencies: ['foldwise-context', 'foldwise-metrics', 'foldwise-render', 'foldwise-spectra'],
});
