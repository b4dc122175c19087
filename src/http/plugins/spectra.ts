import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { SpectrumStore } from '../../risk/spectrum-store.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** One alias-risk spectrum analysis per source version (memory, then the shared tier). */
    spectra: SpectrumStore;
  }
}

export interface SpectraPluginOptions {
  /** L1 budget in bytes; a 12 MP analysis takes about 330 KB. Default 64 MiB. */
  maxBytes?: number;
}

/** Opens the spectrum store at registration, over the shared Redis tier when there is one. */
async function spectraPlugin(app: FastifyInstance, opts: SpectraPluginOptions): Promise<void> {
  const store = new SpectrumStore({
    maxBytes: opts.maxBytes ?? 64 * 1024 * 1024,
    shared: app.sharedRedis?.tier ?? null,
    onSharedError: (err) => app.log.warn({ err }, 'storing a spectrum in the shared tier failed'),
    onShared: (source, key) => app.noteCached(source, key),
  });
  app.decorate('spectra', store);
}

export default fp(spectraPlugin, { name: 'foldwise-spectra', fastify: '5.x', dependencies: ['foldwise-redis', 'foldwise-source-index'] });
