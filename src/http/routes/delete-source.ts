import type { FastifyInstance, FastifyRequest } from 'fastify';
import { z } from 'zod';
import { FoldwiseError } from '../../errors.js';
import { jsonBody, problemResponses } from '../../schemas/openapi.js';
import { checkSignedUrl } from '../../security/signing.js';

const deletionSchema = z
  .object({
    source: z.string(),
    removed: z.boolean().meta({ description: 'Whether the source itself was there (false: only cached copies were).' }),
    entries: z.number().int().meta({ description: 'Cache entries (renditions, analyses) deleted.' }),
    replicas: z.number().int().meta({ description: 'Other replicas told (through Redis).' }),
    confirmed: z.number().int().meta({ description: 'Replicas that confirmed before this answer.' }),
  })
  .meta({ title: 'SourceDeletion' });

/**
 * DELETE /v1/sources/{path}: the source and every rendition of it, on every tier and replica.
 * Refused unless signing is on and this very URL is signed (foldwise sign with method DELETE is
 * not needed: the path alone is signed, and only the key holder can sign it).
 */
export default async function deleteSourceRoutes(app: FastifyInstance): Promise<void> {
  const keys = app.config.signing.keys;
  app.delete(
    '/v1/sources/*',
    {
      config: {
        openapi: {
          summary: 'Delete a source and every rendition of it (signed URL required)',
          tags: ['sources'],
          responses: { '200': jsonBody('What was deleted', deletionSchema), ...problemResponses(400, 403, 404, 502, 503) },
        },
      },
    },
    async (request: FastifyRequest<{ Params: { '*': string } }>, reply) => {
      if (keys.length === 0) throw new FoldwiseError('ERR_SIGNATURE_REQUIRED', 'Deleting sources needs signing on (signing.keys) and a signed URL.');
      checkSignedUrl(request.url, keys, true, 'Deleting a source needs a signed URL (parameter "signature"); see foldwise sign.');
      const unknown = Object.keys(request.query as object).filter((k) => k !== 'signature');
      if (unknown.length > 0) throw new FoldwiseError('ERR_PARAM_UNKNOWN', `unknown parameter: ${unknown.join(', ')}`);
      const result = await app.deleteSource(request.params['*']);
      return reply.header('cache-control', 'no-store').send(result);
    },
  );
}
