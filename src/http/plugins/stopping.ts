import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { FoldwiseError } from '../../errors.js';

export interface StoppingOptions {
  retryAfterSeconds: number;
}

/**
 * Requests that arrive once the app has begun to close (SIGTERM, src/shutdown.ts) get 503
 * ERR_SERVICE_STOPPING as problem+json with Retry-After, and the connection is closed so the
 * client's next try goes to another replica. Fastify's own answer while closing
 * (`return503OnClosing`) is a body of its own shape, so the app switches it off and this hook
 * answers instead; requests already in flight are not touched and finish as usual.
 */
async function stoppingPlugin(app: FastifyInstance, options: StoppingOptions): Promise<void> {
  let stopping = false;
  const retryAfter = String(options.retryAfterSeconds);
  app.addHook('preClose', async () => {
    stopping = true;
  });
  app.addHook('onRequest', async (_request, reply) => {
    if (!stopping) return;
    reply.header('connection', 'close');
    throw new FoldwiseError('ERR_SERVICE_STOPPING', 'this replica is shutting down; retry, another replica may answer', {
      headers: { 'retry-after': retryAfter },
    });
  });
}

export default fp(stoppingPlugin, { name: 'foldwise-stopping', fastify: '5.x', dependencies: ['foldwise-errors'] });
