/** The settings of the render path: its limits, the worker pool and the cache tiers. */
import { z } from 'zod';
import { positiveInt } from './int.js';

export const limitsSchema = z.strictObject({
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
});

export const poolSchema = z.strictObject({
  /** Worker threads; 0 = one per available core. */
  threads: z.number().int().min(0).max(256),
  /**
   * Renders allowed to wait for a worker, their sources read; past it requests wait unread in
   * the lobby (`lobby`), then get 503. null = two per worker thread (small on purpose: see
   * src/pool/options.ts).
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
  /**
   * Requests that may wait, without reading their source, for a place in the line once it is
   * full (each at most maxWaitMs); past them 503 at once. 0 = refuse at once when the line is full.
   */
  lobby: z.number().int().min(0),
  /**
   * The worker threads' nice value (0..19; Linux keeps one per thread): the decode, the encode
   * and the event loop go first when the cores are short (src/pool/nice.ts). 0 = as the process
   * (the default: under a flood of requests the event loop then out-runs the renders).
   */
  threadNice: z.number().int().min(0).max(19),
});

export const cacheSchema = z.strictObject({
  memoryBytes: z.number().int().min(0),
  /** How long a source's identity (size + mtime, upstream ETag) is trusted; 0 = always ask. */
  identityTtlMs: z.number().int().min(0).max(3_600_000),
  /**
   * Bytes of sources read lately kept in memory, so a further rendition of the same picture
   * skips the origin read (src/rendition/source-memo.ts); 0 = read every time.
   */
  sourceBytes: z.number().int().min(0),
  /**
   * Bytes of finished decodes kept in the spool folder (a tmpfs), so a further rendition of the
   * same picture does not decode it again (src/pool/spool/kept.ts); 0 = decode every time.
   */
  decodedBytes: z.number().int().min(0),
  dir: z.string().min(1),
  diskBytes: z.number().int().min(0),
  redisUrl: z.string().url().nullable(),
});

/** The shared Redis tier (used when cache.redisUrl is set) and its cross-replica lock. */
export const redisSchema = z.strictObject({
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
});
