import { createHash } from 'node:crypto';
import type { FastifyInstance } from 'fastify';
import { signingRequired } from '../../security/signing.js';
import { homePage } from '../pages/home.js';
import { asPage } from '../pages/html.js';
import { siteCss } from '../pages/site-css.js';
import { matchesIfNoneMatch } from './conditional.js';

/**
 * GET /: the start page a developer meets when opening the service in a browser.
 * GET /assets/site.css: the stylesheet of the server-made pages; GET /favicon.ico: to the icon.
 */
export default async function homeRoutes(app: FastifyInstance, opts: { version: string }): Promise<void> {
  const { listing } = app.config.origin;
  const signed = signingRequired(app.config.signing);
  app.get(
    '/',
    {
      config: {
        openapi: {
          summary: 'The start page: what foldwise is, where everything is, the demo pictures',
          tags: ['docs'],
          responses: { '200': { description: 'An HTML page', content: { 'text/html': {} } } },
        },
      },
    },
    async (request, reply) => {
      const list = listing ? app.origin.list?.bind(app.origin) : undefined;
      const sources = list ? (await list()).map((e) => e.path) : undefined;
      const html = homePage({
        version: opts.version,
        sources,
        signed,
        origin: `${request.protocol}://${request.host}`,
      });
      return asPage(reply).header('cache-control', 'no-cache').send(html);
    },
  );

  // Browsers ask for it on every document without a <link rel="icon">, renditions opened
  // directly among them: send them to the site's icon rather than to a 404.
  app.get('/favicon.ico', async (_request, reply) => reply.header('cache-control', 'max-age=86400').redirect('/inspect/assets/icon.svg', 301));

  const cssEtag = `"${createHash('sha256').update(siteCss).digest('base64url').slice(0, 27)}"`;
  app.get('/assets/site.css', async (request, reply) => {
    reply.type('text/css; charset=utf-8').header('etag', cssEtag).header('cache-control', 'no-cache').header('x-content-type-options', 'nosniff');
    if (matchesIfNoneMatch(request.headers['if-none-match'], cssEtag)) return reply.code(304).send();
    return reply.send(siteCss);
  });
}
