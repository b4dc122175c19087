import type { FastifyInstance } from 'fastify';

/** GET /metrics: Prometheus text exposition of this process's registry. */
export default async function metricsRoutes(app: FastifyInstance): Promise<void> {
  const { registry } = app.metrics;
  app.get(
    '/metrics',
    {
      config: {
        openapi: {
          summary: 'Prometheus metrics',
          tags: ['operations'],
          responses: { '200': { description: 'Prometheus text format', content: { 'text/plain': {} } } },
        },
      },
    },
    async (_req, reply) => reply.header('cache-control', 'no-store').type(registry.contentType).send(await registry.metrics()),
  );
}
