import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { FoldwiseError } from '../errors.js';
import { jsonBody, problemResponses } from '../schemas/openapi.js';
import { renditionsPrefix } from './renditions.js';
import { signUrl } from '../security/signing.js';

const listingSchema = z.object({
  sources: z.array(
    z.object({
      path: z.string(),
      bytes: z.number().int(),
      modified: z.string().meta({ description: 'ISO 8601' }),
      rendition: z
        .string()
        .meta({ description: 'An example rendition URL (480 CSS px wide), signed when signing keys are set.' }),
    }),
  ),
});

/** Each path segment percent-encoded, the slashes kept. */
const encodePath = (p: string) => p.split('/').map(encodeURIComponent).join('/');

/** GET /v1/sources: the folder origin's images; switched off by config (origin.listing). */
export default async function sourcesRoutes(app: FastifyInstance): Promise<void> {
  const enabled = app.config.origin.listing;
  // With keys set, the examples are signed with the first (signing) key, so they work as given.
  const signingKey = app.config.signing.keys[0];
  const example = (path: string) => {
    const url = `${renditionsPrefix}${encodePath(path)}`;
    return signingKey ? signUrl(url, { width: '480' }, signingKey) : `${url}?width=480`;
  };
  app.get(
    '/v1/sources',
    {
      config: {
        openapi: {
          summary: 'List the sources of the folder origin',
          tags: ['sources'],
          responses: { '200': jsonBody('Sources', listingSchema), ...problemResponses(404) },
        },
      },
    },
    async (_req, reply) => {
      const list = app.origin.list?.bind(app.origin);
      if (!enabled || !list) throw new FoldwiseError('ERR_ORIGIN_DISABLED', 'listing sources is switched off');
      const entries = await list();
      return reply.header('cache-control', 'no-cache').send({
        sources: entries.map((e) => ({ ...e, rendition: example(e.path) })),
      });
    },
  );
}
