import { access } from 'node:fs/promises';
import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { FoldwiseError } from '../errors.js';
import { jsonBody, problemResponses } from '../schemas/openapi.js';

const healthSchema = z.object({ status: z.literal('ok') });
const readySchema = z.object({
  /** degraded: ready, but the shared Redis tier is unreachable (serving from memory and rendering). */
  status: z.enum(['ready', 'degraded', 'not-ready']),
  checks: z.record(z.string(), z.object({ ok: z.boolean(), detail: z.string() })),
});

/**
 * /healthz: the process is alive and serving (for restarts). /readyz: it can take rendition
 * traffic now (for load balancers): the source folder is reachable and the render pool has a
 * free slot. Not ready is a 503 problem, so balancers and people read the same answer.
 */
export default async function healthRoutes(app: FastifyInstance): Promise<void> {
  app.get(
    '/healthz',
    { config: { openapi: { summary: 'Liveness', tags: ['operations'], responses: { '200': jsonBody('Alive', healthSchema), ...problemResponses(503) } } } },
    async (_req, reply) => {
      // Memory that cannot come back down is the one failure a restart cures.
      const stuck = app.memoryStuck();
      if (stuck) throw new FoldwiseError('ERR_MEMORY_STUCK', stuck);
      return reply.header('cache-control', 'no-store').send({ status: 'ok' });
    },
  );

  app.get(
    '/readyz',
    {
      config: {
        openapi: {
          summary: 'Readiness',
          tags: ['operations'],
          responses: { '200': jsonBody('Ready for traffic', readySchema), ...problemResponses(503) },
        },
      },
    },
    async (_req, reply) => {
      const pool = app.renderPool;
      const dir = app.config.origin.sourceDir;
      const originOk = await access(dir).then(() => true, () => false);
      const checks = {
        origin: { ok: originOk, detail: originOk ? 'source folder reachable' : 'source folder missing' },
        pool: {
          ok: pool.inFlight < pool.bound,
          detail: `${pool.inFlight} of ${pool.bound} render slots in use`,
        },
      };
      const failed = Object.entries(checks).filter(([, c]) => !c.ok);
      if (failed.length > 0) {
        throw new FoldwiseError('ERR_NOT_READY', failed.map(([name, c]) => `${name}: ${c.detail}`).join('; '));
      }
      // A Redis outage degrades (no shared cache, no cross-replica single-flight) but never
      // makes a replica unready: taking every replica out together would turn it into an outage.
      const shared = app.sharedRedis?.health();
      const degraded = shared !== undefined && (shared.status !== 'up' || shared.breaker !== 'closed');
      const all = shared
        ? { ...checks, redis: { ok: !degraded, detail: `connection ${shared.status}, circuit ${shared.breaker}` } }
        : checks;
      return reply.header('cache-control', 'no-store').send({ status: degraded ? 'degraded' : 'ready', checks: all });
    },
  );
}
