import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';

const positiveInt = z.number().int().positive();

/** The whole configuration, validated at start; unknown keys are refused so typos surface. */
export const configSchema = z.strictObject({
  server: z.strictObject({
    host: z.string().min(1),
    port: z.number().int().min(0).max(65535),
    logLevel: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']),
    /** json: one JSON object per line (for machines); pretty: readable lines; auto: pretty on a terminal. */
    logFormat: z.enum(['auto', 'json', 'pretty']),
    trustProxy: z.boolean(),
    /**
     * Deadline for receiving a whole request (headers and body), against clients that send
     * slowly on purpose; Node checks it every 30 s. 0 switches it off.
     */
    requestTimeoutMs: z.number().int().min(0),
    /** A connection idle this long (no bytes either way) is closed. 0 switches it off. */
    idleTimeoutMs: z.number().int().min(0),
    /**
     * The address callers reach the service at (behind a load balancer or CDN), e.g.
     * "https://img.example.org": manifests, srcset and callbacks carry absolute URLs under it.
     * null = paths relative to the host the caller used.
     */
    publicUrl: z
      .string()
      .url()
      .regex(/^https?:\/\/[^?#]*$/, 'publicUrl must be an http(s) URL without query or fragment')
      .nullable()
      .optional()
      .transform((v) => v?.replace(/\/+$/, '') ?? null),
  }),
  origin: z.strictObject({
    sourceDir: z.string().min(1),
    /** Serve GET /v1/sources (a listing of the folder origin). */
    listing: z.boolean(),
    /** Generate the demo pictures into sourceDir before listening (npm start). */
    generateDemo: z.boolean(),
    /**
     * s3://bucket/prefix: sources and uploads in an S3-compatible object store instead of
     * sourceDir (credentials and region from AWS_ACCESS_KEY_ID, AWS_SECRET_ACCESS_KEY,
     * AWS_REGION). null = the folder origin.
     */
    storeUrl: z.string().regex(/^s3:\/\/[a-z0-9][a-z0-9.-]{1,61}[a-z0-9](\/.*)?$/, 'storeUrl must be s3://bucket[/prefix]').nullable().optional(),
    /** Endpoint of an S3-compatible server, e.g. http://127.0.0.1:9000 (path-style addressing). */
    s3Endpoint: z.string().url().nullable().optional(),
    /**
     * HTTP(S) upstreams, reached as /v1/renditions/~upstream/<host>[:port]/<path>. Only the
     * allowlisted origins are fetched; every resolved address must be public unless allowed.
     */
    upstream: z.strictObject({
      /** "https://cdn.example.org", "http://127.0.0.1:8123"; a bare host means https. Empty = off. */
      allowHosts: z.array(z.string().min(1)),
      /** Let private, loopback, link-local and unique-local addresses through (intranets, tests). */
      allowPrivate: z.boolean(),
      /** CIDR blocks allowed although not public, e.g. "10.20.0.0/16". */
      allowAddresses: z.array(z.string().min(1)),
      connectTimeoutMs: positiveInt,
      headersTimeoutMs: positiveInt,
      bodyTimeoutMs: positiveInt,
      maxRedirects: z.number().int().min(0).max(10),
      /** Requests to one upstream host at once; more wait in line up to bodyTimeoutMs. */
      perHostConcurrency: positiveInt,
    }),
  }),
  limits: z.strictObject({
    maxDimension: positiveInt.max(65535),
    maxPixels: positiveInt,
    maxSourceBytes: positiveInt,
    maxOutputPixels: positiveInt,
    /** Most animation frames a source may declare (each is rendered; maxPixels counts them all). */
    maxFrames: positiveInt,
    /** Largest upload accepted by POST /v1/ingest, in bytes. */
    maxUploadBytes: positiveInt,
    /** Deadline for decoding one source. */
    decodeTimeoutMs: positiveInt,
    /** Deadline for resampling and encoding one rendition. */
    renderTimeoutMs: positiveInt,
    /**
     * Enlargement caps, in output px per source px: `default` for every rendition (1: never
     * beyond the source, as the upload hook's ladder), `allowed` for one asked with
     * enlarge=allowed. Past the cap the rendition is made smaller, never refused.
     */
    enlargement: z
      .strictObject({ default: z.number().min(1).max(16), allowed: z.number().min(1).max(16) })
      .refine((e) => e.allowed >= e.default, 'allowed must be at least default'),
  }),
  pool: z.strictObject({
    /** Worker threads; 0 = one per available core. */
    threads: z.number().int().min(0).max(256),
    /**
     * Renders allowed to wait for a worker; past it the service answers 503. null = two per
     * worker thread (small on purpose: see RenderPool).
     */
    maxQueue: z.number().int().min(0).nullable(),
    retryAfterSeconds: positiveInt,
    /**
     * Folder for spool files: decodes write their rows there and the workers resample them
     * while the rest is still decoding. 'auto' = /dev/shm (memory-backed) where it exists,
     * else the OS temporary folder; 'off' = decode fully first, then resample.
     */
    spoolDir: z.string().min(1),
    /**
     * Bytes of working memory the jobs admitted at once may need (estimated from each
     * source's header: src/pool/cost.ts). null = half the container's memory limit (cgroup
     * memory.max, else the machine's memory), at most 1 GiB (src/pool/budget-default.ts).
     */
    memoryBudgetBytes: z.number().int().min(64 * 2 ** 20).nullable(),
    /** Longest wait for room in the budget before 503 + Retry-After; well under the idle timeout. */
    maxWaitMs: z.number().int().min(0).max(60_000),
  }),
  cache: z.strictObject({
    memoryBytes: z.number().int().min(0),
    /** How long a source's identity (size + mtime, upstream ETag) is trusted; 0 = always ask. */
    identityTtlMs: z.number().int().min(0).max(3_600_000),
    dir: z.string().min(1),
    diskBytes: z.number().int().min(0),
    redisUrl: z.string().url().nullable(),
  }),
  /** The shared Redis tier (used when cache.redisUrl is set) and its cross-replica lock. */
  redis: z.strictObject({
    ttlSeconds: positiveInt,
    /** Entries larger than this (encoded) stay out of Redis; L1 still keeps them. */
    maxEntryBytes: positiveInt,
    /** Lock lifetime; the holder renews it while rendering, so it only lapses if the holder dies. */
    lockTtlMs: positiveInt,
    /** How long a replica waits for another's render before rendering itself. */
    waitDeadlineMs: positiveInt,
    commandTimeoutMs: positiveInt,
    connectTimeoutMs: positiveInt,
    /** Consecutive failures that open the circuit breaker, and how long it stays open. */
    failureThreshold: positiveInt,
    breakerOpenMs: positiveInt,
    /** Prefix of every key and channel. */
    namespace: z.string(),
  }),
  /** Load shedding (503 + Retry-After); 0 switches a limit off. */
  pressure: z.strictObject({
    maxEventLoopDelayMs: z.number().int().min(0),
    maxHeapUsedBytes: z.number().int().min(0),
    /**
     * Resident memory ceiling: above it new render jobs wait (while others run), and /healthz
     * fails once it stays above for `stuckAfterMs` with no job admitted.
     */
    maxRssBytes: z.number().int().min(0),
    stuckAfterMs: positiveInt,
    sampleIntervalMs: positiveInt,
    retryAfterSeconds: positiveInt,
  }),
  shutdown: z.strictObject({
    /** Time in-flight requests get after SIGTERM before the process exits anyway. */
    deadlineMs: positiveInt,
  }),
  http: z.strictObject({
    maxAgeSeconds: z.number().int().min(0),
    signedMaxAgeSeconds: z.number().int().min(0),
  }),
  signing: z.strictObject({
    /** HMAC keys; the first signs, all verify (rotation). Empty = signing off. */
    keys: z.array(z.string().min(16, 'a signing key needs at least 16 characters')),
    /** Refuse unsigned rendition URLs; unset = required whenever a key is configured. */
    required: z.boolean().optional(),
  }),
  /** POST /v1/ingest: where uploads go and how the rendition ladder is made. */
  ingest: z.strictObject({
    /** Uploads are stored into the folder origin; false refuses them (ERR_INGEST_READ_ONLY). */
    writable: z.boolean(),
    /** Folder under the origin root for uploads, e.g. "uploads"; keys are <prefix>/<sha256 prefix>.<ext>. */
    keyPrefix: z
      .string()
      .regex(/^([A-Za-z0-9_-][A-Za-z0-9._-]*(\/[A-Za-z0-9_-][A-Za-z0-9._-]*)*)?$/, 'keyPrefix must be a relative folder path'),
    /** Hex characters of the SHA-256 kept in the key (16 = 64 bits). */
    digestChars: z.number().int().min(16).max(64),
    /** Formats of every ladder, modern first, then a fallback; each gets its srcset. */
    formats: z.array(z.enum(['webp', 'avif', 'jpeg', 'png'])).min(1),
    /** Renditions of one ingest rendered at the same time. */
    concurrency: z.number().int().min(1).max(64),
    /** Asynchronous jobs remembered at once (Prefer: respond-async). */
    maxJobs: positiveInt,
    /** Finished manifests kept so a repeated ingest does no work. */
    manifestCacheEntries: positiveInt,
    /**
     * With Redis (cache.redisUrl) async jobs live on a shared queue: finished jobs are kept this
     * long for polls; a running job's lock lapses this long after its replica died, and another
     * replica takes the job over; a job failing for a passing reason (5xx) runs at most
     * jobAttempts times, with exponential backoff from 1 s.
     */
    jobResultSeconds: positiveInt,
    jobLockMs: z.number().int().min(500),
    jobAttempts: z.number().int().min(1).max(20),
    /** Callback deliveries: attempts at most, the first retry's delay (doubling), one attempt's deadline. */
    callbackAttempts: z.number().int().min(1).max(20),
    callbackBaseDelayMs: positiveInt,
    callbackTimeoutMs: positiveInt,
  }),
});

export type Config = z.infer<typeof configSchema>;
export type Limits = Config['limits'];

type Json = Record<string, unknown>;

/** Where each environment variable lands in the configuration. */
export const envMap: Record<string, { path: string[]; parse: (v: string) => unknown }> = {
  HOST: { path: ['server', 'host'], parse: (v) => v },
  PORT: { path: ['server', 'port'], parse: (v) => (/^\d+$/.test(v) ? Number(v) : v) },
  FOLDWISE_LOG_FORMAT: { path: ['server', 'logFormat'], parse: (v) => v },
  FOLDWISE_SOURCE_DIR: { path: ['origin', 'sourceDir'], parse: (v) => v },
  FOLDWISE_CACHE_DIR: { path: ['cache', 'dir'], parse: (v) => v },
  FOLDWISE_REDIS_URL: { path: ['cache', 'redisUrl'], parse: (v) => v },
  FOLDWISE_SPOOL_DIR: { path: ['pool', 'spoolDir'], parse: (v) => v },
  FOLDWISE_PUBLIC_URL: { path: ['server', 'publicUrl'], parse: (v) => v },
  FOLDWISE_STORE_URL: { path: ['origin', 'storeUrl'], parse: (v) => v },
  FOLDWISE_S3_ENDPOINT: { path: ['origin', 's3Endpoint'], parse: (v) => v },
  FOLDWISE_UPSTREAM_HOSTS: {
    path: ['origin', 'upstream', 'allowHosts'],
    parse: (v) => v.split(',').map((h) => h.trim()).filter((h) => h.length > 0),
  },
  FOLDWISE_SIGNING_KEY: {
    path: ['signing', 'keys'],
    parse: (v) => v.split(',').map((k) => k.trim()).filter((k) => k.length > 0),
  },
};

/** Thrown when the configuration is invalid; the message names every bad setting. */
export class ConfigError extends Error {
  override name = 'ConfigError';
}

function isObject(v: unknown): v is Json {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Objects merge key by key; arrays and scalars replace. */
export function deepMerge(base: Json, over: Json): Json {
  const out: Json = { ...base };
  for (const [k, v] of Object.entries(over)) {
    out[k] = isObject(v) && isObject(out[k]) ? deepMerge(out[k] as Json, v) : v;
  }
  return out;
}

function setPath(target: Json, path: string[], value: unknown): void {
  let node = target;
  for (const key of path.slice(0, -1)) {
    if (!isObject(node[key])) node[key] = {};
    node = node[key] as Json;
  }
  node[path[path.length - 1]] = value;
}

function readJson(file: string, label: string): Json {
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(file, 'utf8'));
  } catch (e) {
    throw new ConfigError(`${label} (${file}) cannot be read as JSON: ${(e as Error).message}`);
  }
  if (!isObject(parsed)) throw new ConfigError(`${label} (${file}) must hold a JSON object`);
  return parsed;
}

/** Validates a merged configuration object; errors name each setting and, if set, its env var. */
export function validateConfig(raw: unknown, fromEnv: Record<string, string> = {}): Config {
  const result = configSchema.safeParse(raw);
  if (result.success) return result.data;
  const lines = result.error.issues.map((issue) => {
    const at = issue.path.join('.') || '(root)';
    // An issue deep inside an env-set value (e.g. signing.keys.0) still names the variable.
    const source = Object.keys(fromEnv).find((p) => at === p || at.startsWith(`${p}.`));
    const env = source ? ` (from ${fromEnv[source]})` : '';
    const keys = issue.code === 'unrecognized_keys' ? `: ${issue.keys.join(', ')}` : '';
    return `  ${at}${env}: ${issue.message}${keys}`;
  });
  throw new ConfigError(`invalid configuration:\n${lines.join('\n')}`);
}

export const defaultConfigFile = fileURLToPath(new URL('../config/default.json', import.meta.url));

/**
 * Loads config/default.json, then the file named by FOLDWISE_CONFIG, then the environment
 * variables, and validates the result. Throws ConfigError naming every bad value.
 */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  let merged = readJson(defaultConfigFile, 'config/default.json');
  if (env.FOLDWISE_CONFIG) {
    merged = deepMerge(merged, readJson(env.FOLDWISE_CONFIG, 'FOLDWISE_CONFIG'));
  }
  const fromEnv: Record<string, string> = {};
  for (const [name, { path, parse }] of Object.entries(envMap)) {
    const value = env[name];
    if (value === undefined || value === '') continue;
    setPath(merged, path, parse(value));
    fromEnv[path.join('.')] = name;
  }
  return validateConfig(merged, fromEnv);
}

/** Default configuration with overrides merged in (tests, embedding); validated. */
export function resolveConfig(overrides: Json = {}): Config {
  return validateConfig(deepMerge(readJson(defaultConfigFile, 'config/default.json'), overrides));
}
