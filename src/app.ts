import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import Fastify, { type FastifyInstance, type FastifyServerOptions, LogController } from 'fastify';
import type { Flight } from './lib/single-flight.js';
import type { CacheEntry, CacheTier } from './cache/types.js';
import type { Config } from './config.js';
import { createFolderOrigin } from './origins/folder.js';
import { createS3Origin } from './origins/s3.js';
import { upstreamFromConfig, withUpstream } from './origins/upstream-route.js';
import type { Origin } from './origins/types.js';
import cachePlugin from './http/plugins/cache.js';
import contextPlugin from './http/plugins/context.js';
import ingestPlugin from './http/plugins/ingest.js';
import ingestQueuePlugin from './http/plugins/ingest-queue.js';
import callbacksPlugin from './http/plugins/callbacks.js';
import { clientErrorHandler } from './http/plugins/client-errors.js';
import stoppingPlugin from './http/plugins/stopping.js';
import errorsPlugin, { sendProblem, toFoldwiseError } from './http/plugins/errors.js';
import memoryWatchPlugin from './http/plugins/memory-watch.js';
import metricsPlugin from './http/plugins/metrics.js';
import openApiPlugin from './http/plugins/openapi.js';
import pressurePlugin from './http/plugins/pressure.js';
import redisPlugin, { redisSettings } from './http/plugins/redis.js';
import renderPlugin from './http/plugins/rendition.js';
import signingPlugin from './http/plugins/signing.js';
import sourceIndexPlugin from './http/plugins/source-index.js';
import deletionPlugin from './http/plugins/deletion.js';
import deleteSourceRoutes from './http/routes/delete-source.js';
import spectraPlugin from './http/plugins/spectra.js';
import workerPoolPlugin from './http/plugins/worker-pool.js';
import docsRoutes from './http/routes/docs.js';
import healthRoutes from './http/routes/health.js';
import homeRoutes from './http/routes/home.js';
import ingestRoutes from './http/routes/ingest.js';
import inspectRoutes from './http/routes/inspect.js';
import metricsRoutes from './http/routes/metrics.js';
import renditionRoutes from './http/routes/renditions.js';
import aliasRiskRoutes from './http/routes/alias-risk.js';
import sourcesRoutes from './http/routes/sources.js';
import clientHintsPlugin from './http/plugins/client-hints.js';
import { signingRequired } from './security/signing.js';
import type { BandRunner } from './pool/runner.js';

export interface BuildOptions {
  config: Config;
  /** Where sources come from; default the folder origin at config.origin.sourceDir. */
  origin?: Origin;
  /** The shared cache tier; default the disk tier at config.cache.dir. */
  sharedTier?: CacheTier;
  /** Single-flight across replicas; default in-process. */
  flight?: Flight<CacheEntry>;
  /** pino options, or false for none; default JSON logs at config.server.logLevel. */
  logger?: FastifyServerOptions['logger'];
  /** How the render pool runs its band tasks (src/pool/runner.ts); default piscina's run. For fault tests. */
  poolRunner?: BandRunner;
}

const packageVersion = (
  JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string }
).version;

/** A caller-supplied request id is kept only when it is short and plain (it lands in logs). */
function requestId(header: string | string[] | undefined): string {
  return typeof header === 'string' && /^[A-Za-z0-9._:-]{1,64}$/.test(header) ? header : randomUUID();
}

/**
 * Builds the service without listening: plugins (one per concern), then routes. Tests call this
 * and use app.inject(); src/server.ts adds the process shell around it.
 */
export async function build(options: BuildOptions): Promise<FastifyInstance> {
  const { config } = options;
  const app = Fastify({
    logger: options.logger ?? { level: config.server.logLevel },
    trustProxy: config.server.trustProxy,
    genReqId: (req) => requestId(req.headers['x-request-id']),
    // Every request is logged on arrival and completion, under its id (pino).
    logController: new LogController({ requestIdLogLabel: 'requestId' }),
    // Sources are paths: let "a//b" and trailing slashes reach the path checks, not 404 early.
    routerOptions: { ignoreDuplicateSlashes: false, maxParamLength: 1024 },
    // Fastify leaves both off by default, so a client that sends slowly, or opens a
    // connection and stops, would hold it for ever.
    requestTimeout: config.server.requestTimeoutMs,
    connectionTimeout: config.server.idleTimeoutMs,
    // URLs the router cannot decode (bad percent-encoding) get problem details too.
    frameworkErrors: (error, request, reply) => sendProblem(request, reply, toFoldwiseError(error)),
    // Requests Node's parser refuses (bad Content-Length, oversize headers) too.
    clientErrorHandler,
    // While closing, plugins/stopping.ts answers new requests with problem details instead.
    return503OnClosing: false,
  });
  // Callback style (no promise per response): this runs on every answer, cache hits included.
  app.addHook('onSend', (request, reply, payload, done) => {
    reply.header('x-request-id', request.id);
    done(null, payload);
  });

  const { storeUrl, s3Endpoint } = config.origin;
  const local = storeUrl
    ? createS3Origin({ storeUrl, endpoint: s3Endpoint, maxBytes: config.limits.maxSourceBytes, retryAfterSeconds: config.pool.retryAfterSeconds })
    : createFolderOrigin(config.origin.sourceDir, { maxBytes: config.limits.maxSourceBytes });
  const origin = options.origin ?? withUpstream(local, upstreamFromConfig(config));
  await app.register(errorsPlugin);
  await app.register(stoppingPlugin, { retryAfterSeconds: config.pool.retryAfterSeconds });
  await app.register(openApiPlugin);
  await app.register(clientHintsPlugin);
  await app.register(metricsPlugin);
  await app.register(contextPlugin, { config, origin });
  await app.register(pressurePlugin, config.pressure);
  await app.register(redisPlugin, { settings: redisSettings(config) });
  await app.register(cachePlugin, {
    cache: config.cache,
    sharedTier: options.sharedTier ?? app.sharedRedis?.tier,
    flight: options.flight ?? app.sharedRedis?.flight,
  });
  await app.register(workerPoolPlugin, { ...config.pool, rssCeilingBytes: config.pressure.maxRssBytes, runner: options.poolRunner });
  await app.register(memoryWatchPlugin, config.pressure);
  await app.register(sourceIndexPlugin);
  await app.register(spectraPlugin);
  await app.register(renderPlugin);
  await app.register(signingPlugin, {
    keys: config.signing.keys,
    // Required by default whenever a key is set; required without a key stops the start.
    required: signingRequired(config.signing),
    signedMaxAgeSeconds: config.http.signedMaxAgeSeconds,
  });

  await app.register(ingestPlugin);
  await app.register(callbacksPlugin);
  await app.register(ingestQueuePlugin);
  await app.register(deletionPlugin);

  await app.register(renditionRoutes);
  await app.register(aliasRiskRoutes);
  await app.register(ingestRoutes);
  await app.register(sourcesRoutes);
  await app.register(deleteSourceRoutes);
  await app.register(healthRoutes);
  await app.register(metricsRoutes);
  await app.register(docsRoutes, { version: packageVersion });
  await app.register(inspectRoutes);
  await app.register(homeRoutes, { version: packageVersion });
  return app;
}
