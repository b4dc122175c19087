import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import type { Config } from '../../config.js';
import type { Origin } from '../../origins/types.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** The validated configuration this app was built with. */
    config: Config;
    /** Where sources come from (the folder origin by default). */
    origin: Origin;
  }
}

export interface ContextOptions {
  config: Config;
  origin: Origin;
}

/** Makes the configuration and the origin available to every route and plugin. */
async function contextPlugin(app: FastifyInstance, opts: ContextOptions): Promise<void> {
  app.decorate('config', opts.config);
  app.decorate('origin', opts.origin);
}

export default fp(contextPlugin, { name: 'foldwise-context', fastify: '5.x' });
