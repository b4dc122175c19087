import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { Gauge } from 'prom-client';
import { RenderPool, type RenderPoolOptions } from '../../pool/render-pool.js';

declare module 'fastify' {
  interface FastifyInstance {
    renderPool: RenderPool;
    /** Warm-up work beyond the pool's own (the server's render through the real path, http/warm-path.ts) that /readyz waits for too. */
    warmUp: WarmUp;
  }
}

/** Work /readyz waits for besides the pool's warm start. */
export interface WarmUp {
  /** /readyz says not ready until `work` has settled. */
  hold(work: Promise<unknown>): void;
  /** Whether held work is still running. */
  readonly pending: boolean;
}

function warmUp(): WarmUp {
  let running = 0;
  return {
    hold(work) {
      running++;
      void work.catch(() => undefined).finally(() => running--);
    },
    get pending() {
      return running > 0;
    },
  };
}

/** Starts the worker-thread pool at registration, reports its load, and closes it with the app. */
async function workerPoolPlugin(app: FastifyInstance, opts: RenderPoolOptions): Promise<void> {
  const pool = new RenderPool(opts);
  const registers = [app.metrics.registry];
  new Gauge({
    name: 'foldwise_pool_queue_depth',
    help: 'Resample tasks waiting for a worker thread.',
    registers,
    collect() {
      this.set(pool.queueDepth);
    },
  });
  new Gauge({
    name: 'foldwise_pool_renders_in_flight',
    help: `Renders admitted (bound: ${pool.bound}; past it requests get 503).`,
    registers,
    collect() {
      this.set(pool.inFlight);
    },
  });
  new Gauge({
    name: 'foldwise_pool_lobby',
    help: 'Requests waiting, their sources unread, for a place in the wait line (pool.lobby).',
    registers,
    collect() {
      this.set(pool.memory().lobby);
    },
  });
  new Gauge({
    name: 'foldwise_pool_utilization',
    help: 'Share of worker-thread capacity in use (piscina).',
    registers,
    collect() {
      this.set(pool.utilization);
    },
  });
  if (pool.spool) app.log.info({ spoolDir: pool.spool.dir }, 'renders resample sources while they decode');
  else if (opts.spoolDir !== 'off') app.log.warn({ spoolDir: opts.spoolDir }, 'spool folder unavailable: sources are decoded in full before resampling');
  // Warm start: every thread loads, compiles its kernels and renders once while the server
  // starts; /readyz answers 503 until it is done (server.ts waits for it before saying ready).
  const started = performance.now();
  pool.warm().then(
    () => app.log.info({ ms: Math.round(performance.now() - started), threads: pool.threads }, 'render threads warm'),
    (err: unknown) => app.log.warn({ err }, 'render threads did not warm up'),
  );
  app.decorate('renderPool', pool);
  app.decorate('warmUp', warmUp());
  app.addHook('onClose', async () => pool.close());
}

export default fp(workerPoolPlugin, { name: 'foldwise-worker-pool', fastify: '5.x', dependencies: ['foldwise-metrics'] });
