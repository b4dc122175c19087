import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { IngestService } from '../ingest/service.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The upload hook's service: manifests, the content-addressed store, async jobs. */
    ingest: IngestService;
  }
}

/** Creates the ingest service once, on the app's render context and configuration. */
async function ingestPlugin(app: FastifyInstance): Promise<void> {
  app.decorate('ingest', new IngestService(app.config, app.renderContext));
}

export default fp(ingestPlugin, {
  name: 'foldwise-ingest',
  fastify: '5.x',
  dependencies: ['foldwise-context', 'foldwise-render'],
});
