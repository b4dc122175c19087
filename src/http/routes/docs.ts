import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { errorCodes } from '../../errors.js';
import { jsonBody, openApiDocument } from '../../schemas/openapi.js';

const errorListSchema = z.object({
  errors: z.array(z.object({ code: z.string(), status: z.number().int(), title: z.string() })),
});

/**
 * GET /docs: the OpenAPI 3.1 document, generated from the zod schemas the routes validate with
 * (built on first request, when every route has registered). GET /docs/errors: every error
 * code with its status and title; problem `type`s point here.
 */
export default async function docsRoutes(app: FastifyInstance, opts: { version: string }): Promise<void> {
  let doc: unknown;
  app.get(
    '/docs',
    { config: { openapi: { summary: 'This OpenAPI document', tags: ['docs'], responses: { '200': { description: 'OpenAPI 3.1 JSON' } } } } },
    async () => (doc ??= openApiDocument(app.apiOperations, opts.version)),
  );
  const errors = Object.entries(errorCodes).map(([code, v]) => ({ code, status: v.status, title: v.title }));
  app.get(
    '/docs/errors',
    { config: { openapi: { summary: 'Error codes', tags: ['docs'], responses: { '200': jsonBody('Every error code', errorListSchema) } } } },
    async () => ({ errors }),
  );
}
