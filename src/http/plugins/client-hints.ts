import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { acceptCh } from '../routes/hints.js';

/**
 * Advertises the Client Hints the rendition route reads (RFC 8942, `Accept-CH`) on every HTML
 * page the service answers: browsers take `Accept-CH` from a document's response, not from
 * an image's, so pages of this origin are where it opts a browser in for its renditions. A
 * site on another origin opts in on its own pages (README, "Client Hints").
 */
async function clientHints(app: FastifyInstance): Promise<void> {
  // Callback style (no promise per response): it runs on every answer, cache hits included.
  app.addHook('onSend', (_request, reply, payload, done) => {
    const type = reply.getHeader('content-type');
    if (typeof type === 'string' && type.startsWith('text/html') && !reply.hasHeader('accept-ch')) reply.header('accept-ch', acceptCh);
    done(null, payload);
  });
}

export default fp(clientHints, { name: 'foldwise-client-hints', fastify: '5.x' });
