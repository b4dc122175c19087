import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { FoldwiseError } from '../../errors.js';
import { jsonBody, problemResponses } from '../../schemas/openapi.js';
import { renditionsPrefix } from '../../schemas/paths.js';
import { signUrl } from '../../security/signing.js';
import { checkSignedUrl } from '../../security/signing.js';

const listingSchema = z.object({
  sources: z.array(
    z.object({
      path: z.string(),
      bytes: z.number().int(),
      modified: z.string().meta({ description: 'ISO 8601' }),
      rendition: z
        .string()
        .meta({
          description:
            'An example rendition URL (480 CSS px wide). With signing on it is signed only when the listing request itself is signed; otherwise it is the unsigned URL, for the key holder to sign.',
        }),
    }),
  ),
});

/** Each path segment percent-encoded, the slashes kept. */
const encodePath = (p: string) => p.split('/').map(encodeURIComponent).join('/');

/** GET /v1/sources: the folder origin's images; switched off by config (origin.listing). */
export default async function sourcesRoutes(app: FastifyInstance): Promise<void> {
  const enabled = app.config.origin.listing;
  // With keys set, the examples are signed with the first (signing) key, but only for a signed
  // listing request: the public listing would otherwise hand out a working URL for every source.
  const keys = app.config.signing.keys;
  const example = (path: string, sign: boolean) => {
    const url = `${renditionsPrefix}${encodePath(path)}`;
    return sign ? signUrl(url, { width: '480' }, keys[0]) : `${url}?width=480`;
  };
  app.get(
    '/v1/sources',
    {
      config: {
        openapi: {
          summary: 'List the sources of the folder origin',
          tags: ['sources'],
          responses: { '200': jsonBody('Sources', listingSchema), ...problemResponses(403, 404) },
        },
      },
    },
    async (request, reply) => {
      const list = app.origin.list?.bind(app.origin);
      if (!enabled || !list) throw new FoldwiseError('ERR_ORIGIN_DISABLED', 'listing sources is switched off');
      // A wrong signature is refused; a missing one lists unsigned examples (never required here).
      const signed = keys.length > 0 && checkSignedUrl(request.url, keys, false, '');
      const entries = await list();
      return reply.header('cache-control', 'no-cache').send({
        sources: entries.map((e) => ({ ...e, rendition: example(e.path, signed) })),
      });
    },
  );
}
