import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';
import { IdentityMemo } from '../../rendition/identity.js';
import { SourceMemo } from '../../rendition/source-memo.js';
import type { RenderContext } from '../../rendition/service.js';
import { adaptivePrefilter } from '../../risk/service.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** What renderRendition needs, wired to this app's origin, cache, pool and metrics. */
    renderContext: RenderContext;
  }
}

/** Assembles the render context once, at registration, from the other plugins. */
async function renderPlugin(app: FastifyInstance): Promise<void> {
  const { metrics } = app;
  const sources = app.config.cache.sourceBytes > 0 ? new SourceMemo(app.config.cache.sourceBytes) : undefined;
  new Gauge({
    name: 'foldwise_source_bytes_kept',
    help: `Bytes of sources read lately kept for their next rendition (bound cache.sourceBytes: ${app.config.cache.sourceBytes}).`,
    registers: [metrics.registry],
    collect() {
      this.set(sources?.bytes ?? 0);
    },
  });
  app.decorate('renderContext', {
    origin: app.origin,
    onStored: (source, key) => app.noteCached(source, key),
    identities: new IdentityMemo(app.origin, app.config.cache.identityTtlMs),
    sources,
    cache: app.renditionCache.cache,
    flight: app.renditionCache.flight,
    pool: app.renderPool,
    limits: app.config.limits,
    observe: (stage, seconds) => metrics.stageSeconds.observe({ stage }, seconds),
    onLookup: (result) => metrics.cacheLookups.inc({ result }),
    adaptive: adaptivePrefilter(app.spectra, app.renderPool),
  } satisfies RenderContext);
}

export default fp(renderPlugin, {
  name: 'foldwise-render',
  fastify: '5.x',
  dependencies: ['foldwise-context', 'foldwise-metrics', 'foldwise-cache', 'foldwise-worker-pool', 'foldwise-spectra', 'foldwise-source-index'],
});
