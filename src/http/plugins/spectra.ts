import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { MemoryTier } from '../../cache/memory.js';
import { SpectrumStore } from '../../risk/spectrum-store.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** One alias-risk spectrum analysis per source version (memory, then the rendition cache's shared tiers). */
    spectra: SpectrumStore;
  }
}

export interface SpectraPluginOptions {
  /** L1 budget in bytes; a 12 MP analysis takes about 330 KB. Default 64 MiB. */
  maxBytes?: number;
}

/**
 * Opens the spectrum store at registration, over the rendition cache's tiers below memory (the
 * disk folder, Redis): a restart or another replica finds an analysis there.
 */
async function spectraPlugin(app: FastifyInstance, opts: SpectraPluginOptions): Promise<void> {
  const store = new SpectrumStore({
    maxBytes: opts.maxBytes ?? 64 * 1024 * 1024,
    tiers: app.renditionCache.cache.tiers.filter((t) => !(t instanceof MemoryTier)),
    onSharedError: (err) => app.log.warn({ err }, 'a cache tier failed to read or store a spectrum'),
    // In the pool's threads: the event loop never waits through an analysis.
    analyser: (raster) => app.renderPool.analyseRaster(raster),
    // Noted by source, so a deletion removes the kept analysis from every tier too.
    onShared: (source, key) => app.noteCached(source, key),
  });
  app.decorate('spectra', store);
  // Analyses still being written go to the tiers before they close.
  app.addHook('preClose', () => store.settled());
}

export default fp(spectraPlugin, {
  name: 'foldwise-spectra',
  fastify: '5.x',
  dependencies: ['foldwise-cache', 'foldwise-worker-pool', 'foldwise-source-index'],
});
