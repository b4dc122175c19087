import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import type { Operation } from '../../schemas/openapi.js';

declare module 'fastify' {
  interface FastifyContextConfig {
    /** The route's OpenAPI operation; collected for GET /docs. */
    openapi?: Operation;
  }
  interface FastifyInstance {
    /** Documented operations by OpenAPI path and lower-case method. */
    apiOperations: Record<string, Record<string, Operation>>;
  }
}

/** Fastify's `:name` and `*` route syntax to OpenAPI's `{name}`; the wildcard is {source}. */
function openApiPath(url: string): string {
  return url.replace(/:([A-Za-z0-9_]+)/g, '{$1}').replace(/\*$/, '{source}');
}

/**
 * Collects the OpenAPI operation every route declares in `config.openapi`, so the document is
 * generated from the same zod schemas the routes validate with. Register before the routes.
 */
async function openApiPlugin(app: FastifyInstance): Promise<void> {
  const operations: Record<string, Record<string, Operation>> = {};
  app.decorate('apiOperations', operations);
  app.addHook('onRoute', (route) => {
    const op = route.config?.openapi;
    if (!op) return;
    const methods = Array.isArray(route.method) ? route.method : [route.method];
    const path = openApiPath(route.url);
    for (const m of methods) {
      if (m === 'HEAD') continue;
      (operations[path] ??= {})[m.toLowerCase()] = op;
    }
  });
}

export default fp(openApiPlugin, { name: 'foldwise-openapi', fastify: '5.x' });
