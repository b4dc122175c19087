import { statfsSync } from 'node:fs';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';
import { IdentityMemo } from '../../rendition/identity.js';
import { SourceMemo } from '../../rendition/source-memo.js';
import { KeptDecodes, keptBound } from '../../pool/spool/kept.js';
import type { RenderContext } from '../../rendition/service.js';
import { adaptivePrefilter } from '../../risk/service.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** What renderRendition needs, wired to this app's origin, cache, pool and metrics. */
    renderContext: RenderContext;
  }
}

/** The size of the file system holding `dir` (Infinity when it cannot be told). */
function folderBytes(dir: string): number {
  try {
    const fs = statfsSync(dir);
    return fs.bsize * fs.blocks;
  } catch {
    return Infinity;
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
  const { spool } = app.renderPool;
  const decodedBytes = spool ? keptBound(app.config.cache.decodedBytes, folderBytes(spool.dir)) : 0;
  const keptDecodes = spool && decodedBytes > 0 ? new KeptDecodes(decodedBytes, (path) => spool.remove(path)) : undefined;
  // The kept files go at close (the pool's own close removes its spool folder too, whichever runs first).
  app.addHook('onClose', async () => {
    keptDecodes?.clear();
    await keptDecodes?.settled();
  });
  new Gauge({
    name: 'foldwise_decoded_bytes_kept',
    help: `Bytes of finished decodes kept in the spool folder for their next rendition (bound: ${decodedBytes}, cache.decodedBytes or a quarter of the folder's file system).`,
    registers: [metrics.registry],
    collect() {
      this.set(keptDecodes?.bytes ?? 0);
    },
  });
  app.decorate('renderContext', {
    origin: app.origin,
    onStored: (source, key) => app.noteCached(source, key),
    identities: new IdentityMemo(app.origin, app.config.cache.identityTtlMs),
    sources,
    keptDecodes,
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
