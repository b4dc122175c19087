/** The settings of the listening server and of where sources come from. */
import { z } from 'zod';
import { positiveInt } from './int.js';

export const serverSchema = z.strictObject({
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
});

export const originSchema = z.strictObject({
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
});
