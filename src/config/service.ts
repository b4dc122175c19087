/** The settings of the service around the renders: load shedding, shutdown, HTTP caching, signing, uploads. */
import { z } from 'zod';
import { positiveInt } from './int.js';

/** Load shedding (503 + Retry-After); 0 switches a limit off. */
export const pressureSchema = z.strictObject({
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
});

export const shutdownSchema = z.strictObject({
  /** Time in-flight requests get after SIGTERM before the process exits anyway. */
  deadlineMs: positiveInt,
});

export const httpSchema = z.strictObject({
  maxAgeSeconds: z.number().int().min(0),
  signedMaxAgeSeconds: z.number().int().min(0),
});

export const signingSchema = z.strictObject({
  /** HMAC keys; the first signs, all verify (rotation). Empty = signing off. */
  keys: z.array(z.string().min(16, 'a signing key needs at least 16 characters')),
  /** Refuse unsigned rendition URLs; unset = required whenever a key is configured. */
  required: z.boolean().optional(),
});

/** POST /v1/ingest: where uploads go and how the rendition ladder is made. */
export const ingestSchema = z.strictObject({
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
});
