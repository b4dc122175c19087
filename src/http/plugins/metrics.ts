import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import { isWarmUp } from '../warm-up-token.js';
import { collectDefaultMetrics, Counter, Histogram, Registry } from 'prom-client';

/** The service's Prometheus instruments, one registry per app (tests build many apps). */
export interface Metrics {
  registry: Registry;
  httpRequests: Counter<'route' | 'method' | 'status'>;
  httpSeconds: Histogram<'route' | 'method' | 'status'>;
  stageSeconds: Histogram<'stage'>;
  cacheLookups: Counter<'result'>;
  cacheStoredBytes: Counter<'tier'>;
  cacheErrors: Counter<'tier' | 'op'>;
  cacheCorrupt: Counter<'tier'>;
  cacheFull: Counter<'tier'>;
}

declare module 'fastify' {
  interface FastifyInstance {
    metrics: Metrics;
  }
}

/**
 * How often prom-client's event-loop monitor samples (monitorEventLoopDelay's resolution, its
 * default). What `foldwise_nodejs_eventloop_lag_*` report is the time between two samples, so
 * an idle loop reads this much (p50 10.2 ms measured), and a loop late by d ms reads d + this
 * (Node's perf_hooks records the spacing of its sampling timer, nodejs/node#34661; fastify's
 * under-pressure subtracts the resolution for the same reason).
 */
export const LAG_SAMPLE_MS = 10;

// Latency buckets from 1 ms to 20 s: cache hits sit at the bottom, 12 MP misses near the top.
const buckets = [0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 20];

export function createMetrics(): Metrics {
  const registry = new Registry();
  collectDefaultMetrics({ register: registry, prefix: 'foldwise_', eventLoopMonitoringPrecision: LAG_SAMPLE_MS });
  const registers = [registry];
  return {
    registry,
    httpRequests: new Counter({
      name: 'foldwise_http_requests_total',
      help: 'HTTP requests by route pattern, method and status.',
      labelNames: ['route', 'method', 'status'],
      registers,
    }),
    httpSeconds: new Histogram({
      name: 'foldwise_http_request_duration_seconds',
      help: 'HTTP request latency by route pattern, method and status.',
      labelNames: ['route', 'method', 'status'],
      buckets,
      registers,
    }),
    stageSeconds: new Histogram({
      name: 'foldwise_render_stage_seconds',
      help: 'Time spent per render stage (origin, decode, resample, encode, cache; stream = decode and resample overlapped, then decode is the header read only).',
      labelNames: ['stage'],
      buckets,
      registers,
    }),
    cacheLookups: new Counter({
      name: 'foldwise_cache_lookups_total',
      help: 'Rendition cache lookups by result (hit-<tier> or miss).',
      labelNames: ['result'],
      registers,
    }),
    cacheStoredBytes: new Counter({
      name: 'foldwise_cache_stored_bytes_total',
      help: 'Bytes of renditions stored into the cache.',
      labelNames: ['tier'],
      registers,
    }),
    cacheErrors: new Counter({
      name: 'foldwise_cache_errors_total',
      help: 'Cache tier failures (treated as misses).',
      labelNames: ['tier', 'op'],
      registers,
    }),
    cacheCorrupt: new Counter({
      name: 'foldwise_cache_corrupt_entries_total',
      help: 'Cache entries found damaged on read (wrong length or content hash): deleted, read as misses, rendered again.',
      labelNames: ['tier'],
      registers,
    }),
    cacheFull: new Counter({
      name: 'foldwise_cache_full_writes_total',
      help: 'Cache writes refused for want of space (ENOSPC, EDQUOT); the request still gets its rendition.',
      labelNames: ['tier'],
      registers,
    }),
  };
}

/**
 * Prometheus instruments and the per-request accounting: every response is counted and timed
 * by its route pattern (never the raw URL, so sources cannot blow up label cardinality).
 */
async function metricsPlugin(app: FastifyInstance): Promise<void> {
  const metrics = createMetrics();
  app.decorate('metrics', metrics);
  // Callback style (no promise per response): this runs on every answer, cache hits included.
  app.addHook('onResponse', (request, reply, done) => {
    if (isWarmUp(request.headers)) return done();
    const labels = {
      route: request.routeOptions.url ?? 'unmatched',
      method: request.method,
      status: String(reply.statusCode),
    };
    metrics.httpRequests.inc(labels);
    metrics.httpSeconds.observe(labels, reply.elapsedTime / 1000);
    done();
  });
}

export default fp(metricsPlugin, { name: 'foldwise-metrics', fastify: '5.x' });
