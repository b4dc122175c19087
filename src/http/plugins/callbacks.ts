import { lookup } from 'node:dns/promises';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Counter } from 'prom-client';
import { deliverCallback } from '../../ingest/callback.js';
import { CallbackSender } from '../../ingest/callback-sender.js';
import { createAddressGuard } from '../../origins/address-guard.js';
import type { Resolver } from '../../origins/http-fetch.js';

declare module 'fastify' {
  interface FastifyInstance {
    /** Delivers job outcomes to callback URLs (retries on the shared queue with Redis). */
    callbacks: CallbackSender;
  }
}

const systemResolve: Resolver = (hostname) => lookup(hostname, { all: true, verbatim: true });

/**
 * The callback sender, its target checks compiled from the upstream settings (the same
 * address guard: private addresses only when origin.upstream allows them), signed with the
 * first signing key. With cache.redisUrl the retries are BullMQ jobs in the same Redis.
 */
async function callbacksPlugin(app: FastifyInstance): Promise<void> {
  const { config } = app;
  const { upstream } = config.origin;
  const guard = createAddressGuard({ allowPrivate: upstream.allowPrivate, allowAddresses: upstream.allowAddresses });
  const key = config.signing.keys[0] ?? '';
  const sender = new CallbackSender(
    (url, body) => deliverCallback(url, body, { guard, resolve: systemResolve, timeoutMs: config.ingest.callbackTimeoutMs, key }),
    {
      attempts: config.ingest.callbackAttempts,
      baseDelayMs: config.ingest.callbackBaseDelayMs,
      shared: config.cache.redisUrl
        ? { url: config.cache.redisUrl, prefix: `${config.redis.namespace}q`, closeMs: config.redis.connectTimeoutMs, lockMs: config.ingest.jobLockMs }
        : undefined,
    },
  );
  const outcomes = new Counter({
    name: 'foldwise_ingest_callbacks_total',
    help: 'Callback deliveries finished by this replica: delivered, or given up after every attempt.',
    labelNames: ['outcome'],
    registers: [app.metrics.registry],
  });
  sender.on('delivered', () => outcomes.inc({ outcome: 'delivered' }));
  sender.on('gave-up', (job: string, err: unknown) => {
    outcomes.inc({ outcome: 'gave-up' });
    app.log.warn({ job, err: (err as Error)?.message }, 'callback not delivered after every attempt');
  });
  sender.on('redis-error', (e: Error) => app.log.warn({ err: e.message }, 'callback queue: Redis error'));
  app.decorate('callbacks', sender);
  app.addHook('onClose', async () => sender.close());
}

export default fp(callbacksPlugin, { name: 'foldwise-callbacks', fastify: '5.x', dependencies: ['foldwise-context', 'foldwise-metrics'] });
