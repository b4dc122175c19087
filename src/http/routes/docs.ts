import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { errorCodes } from '../../errors.js';
import { jsonBody, openApiDocument } from '../../schemas/openapi.js';
import { errorsPage } from '../pages/errors.js';
import { asPage } from '../pages/html.js';
import { referencePage, referencePolicy } from '../pages/reference.js';
import docsAssetRoutes from './docs-assets.js';

const errorListSchema = z.object({
  errors: z.array(z.object({ code: z.string(), status: z.number().int(), title: z.string() })),
});

const htmlPage = (description: string) => ({ '200': { description, content: { 'text/html': {} } } });

/**
 * GET /docs: the API reference as a page, drawn by Swagger UI (served from this process, see
 * docs-assets.ts) from the OpenAPI 3.1 document at GET /docs/openapi.json, which is generated from the zod schemas the routes validate with (built
 * on first request, when every route has registered). GET /docs/errors: every error code as a
 * page with one anchor per code (problem `type`s point there); /docs/errors.json the same list.
 */
export default async function docsRoutes(app: FastifyInstance, opts: { version: string }): Promise<void> {
  let doc: unknown;
  const reference = referencePage(opts.version);
  const document = () => (doc ??= openApiDocument(app.apiOperations, opts.version));
  app.get(
    '/docs',
    { config: { openapi: { summary: 'The API reference (this document, drawn by Swagger UI)', tags: ['docs'], responses: htmlPage('The reference, HTML') } } },
    async (_request, reply) => asPage(reply).header('content-security-policy', referencePolicy).header('cache-control', 'no-cache').send(reference),
  );
  await app.register(docsAssetRoutes);
  app.get(
    '/docs/openapi.json',
    { config: { openapi: { summary: 'This OpenAPI document', tags: ['docs'], responses: { '200': { description: 'OpenAPI 3.1 JSON' } } } } },
    async () => document(),
  );
  const errors = Object.entries(errorCodes).map(([code, v]) => ({ code, status: v.status, title: v.title }));
  const errorsHtml = errorsPage();
  app.get(
    '/docs/errors',
    { config: { openapi: { summary: 'Error codes, one anchor each (problem types point here)', tags: ['docs'], responses: htmlPage('Every error code, HTML') } } },
    async (_request, reply) => asPage(reply).header('cache-control', 'no-cache').send(errorsHtml),
  );
  app.get(
    '/docs/errors.json',
    { config: { openapi: { summary: 'Error codes', tags: ['docs'], responses: { '200': jsonBody('Every error code', errorListSchema) } } } },
    async () => ({ errors }),
  );
}
