import { access } from 'node:fs/promises';
import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { FoldwiseError } from '../../errors.js';
import { jsonBody, problemResponses } from '../../schemas/openapi.js';

const healthSchema = z.object({ status: z.literal('ok') });
const readySchema = z.object({
  /** degraded: ready, but a cache tier is down (Redis unreachable, the disk cache off or full): serving from memory and rendering. */
  status: z.enum(['ready', 'degraded', 'not-ready']),
  checks: z.record(z.string(), z.object({ ok: z.boolean(), detail: z.string() })),
});

/**
 * /healthz: the process is alive and serving (for restarts). /readyz: this replica can serve
 * rendition traffic, hits included (for load balancers): 503 while its render threads warm up
 * at start (RenderPool.warm), while it stops, or when its source folder is gone. Busy render slots do not make it unready: a replica in a miss flood
 * still serves every hit, and pulling all busy replicas at once would turn load into an outage
 * (misses past the bound get their own 503 with Retry-After). A degraded shared tier (Redis
 * down, the disk cache off or full) answers 200 "degraded" with the reason. With Redis, a
 * replica that is not subscribed to the purge channel would miss deletions made on another
 * replica and serve what they removed: it is not ready until subscribed (at start, and again
 * after a reconnect while Redis is up); while its Redis is down it is degraded, like the tier.
 */
export default async function healthRoutes(app: FastifyInstance): Promise<void> {
  let stopping = false;
  app.addHook('preClose', async () => {
    stopping = true;
  });

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
          responses: { '200': jsonBody('Ready for traffic (or degraded: serving, with a tier down)', readySchema), ...problemResponses(503) },
        },
      },
    },
    async (_req, reply) => {
      const pool = app.renderPool;
      const checks: Record<string, { ok: boolean; detail: string }> = {
        origin: await originCheck(app),
        stopping: { ok: !stopping, detail: stopping ? 'shutting down' : 'running' },
        warm: { ok: pool.warmed && !app.warmUp.pending, detail: pool.warmed ? (app.warmUp.pending ? 'rendering a warm-up picture' : 'render threads warm') : 'render threads starting' },
      };
      const purge = purgeCheck(app);
      if (purge?.blocks) checks.purge = purge.check;
      const failed = Object.entries(checks).filter(([, c]) => !c.ok);
      if (failed.length > 0) {
        throw new FoldwiseError('ERR_NOT_READY', failed.map(([name, c]) => `${name}: ${c.detail}`).join('; '));
      }
      // Informational: a full budget never fails readiness (hits are still served).
      const m = pool.memory();
      const mib = (b: number) => (b / 2 ** 20).toFixed(0);
      checks.pool = { ok: true, detail: `${mib(m.admittedBytes)} of ${mib(m.budgetBytes)} MiB admitted; ${m.running} jobs running, ${m.waiting} waiting` };
      // Degraded tiers (no shared cache, no cross-replica single-flight, no disk) never make a
      // replica unready: taking every replica out together would turn it into an outage.
      for (const [tier, health] of Object.entries(app.renditionCache.health())) checks[`cache-${tier}`] = health;
      const shared = app.sharedRedis?.health();
      if (shared) {
        const ok = shared.status === 'up' && shared.breaker === 'closed';
        checks.redis = { ok, detail: `connection ${shared.status}, circuit ${shared.breaker}` };
      }
      if (purge) checks.purge = purge.check;
      const degraded = Object.values(checks).some((c) => !c.ok);
      return reply.header('cache-control', 'no-store').send({ status: degraded ? 'degraded' : 'ready', checks });
    },
  );
}

/**
 * The purge subscription's check; `blocks` when it makes the replica unready: not subscribed
 * while Redis is up, or not yet at all since start (its first outcome pending).
 */
function purgeCheck(app: FastifyInstance): { check: { ok: boolean; detail: string }; blocks: boolean } | undefined {
  const bus = app.purgeBus;
  if (!bus) return undefined;
  const state = bus.state;
  const detail = { live: 'subscribed to deletions', starting: 'subscribing to deletions', lost: 'not subscribed to deletions' }[state];
  const redisUp = app.sharedRedis?.health().status === 'up';
  return { check: { ok: state === 'live', detail }, blocks: state === 'starting' || (state === 'lost' && redisUp) };
}

/**
 * The folder origin's folder must exist. An object store is not asked here: a store that fails
 * answers each request 502 with Retry-After while hits are still served, and taking every
 * replica out of the balancer for it would turn that into an outage.
 */
async function originCheck(app: FastifyInstance): Promise<{ ok: boolean; detail: string }> {
  const { storeUrl, sourceDir } = app.config.origin;
  if (storeUrl) return { ok: true, detail: `object store ${storeUrl}` };
  const ok = await access(sourceDir).then(() => true, () => false);
  return { ok, detail: ok ? 'source folder reachable' : 'source folder missing' };
}
