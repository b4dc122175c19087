/**
 * The one registry of error codes. Each code has its HTTP status and a title; the error
 * handler turns a FoldwiseError into RFC 9457 problem details (application/problem+json).
 * Codes are stable: clients may match on them. Append new codes; never rename one.
 */
export const errorCodes = {
  ERR_REQUEST_INVALID: { status: 400, title: 'The request is not valid' },
  ERR_PARAM_UNKNOWN: { status: 400, title: 'Unknown parameter' },
  ERR_PARAM_INVALID: { status: 400, title: 'Invalid parameter value' },
  ERR_PARAM_REPEATED: { status: 400, title: 'Parameter given more than once' },
  ERR_PARAM_MISSING: { status: 400, title: 'Required parameter missing' },
  ERR_SOURCE_NOT_FOUND: { status: 404, title: 'Source not found' },
  ERR_SOURCE_PATH_INVALID: { status: 400, title: 'Source path not allowed' },
  ERR_SOURCE_TOO_LARGE: { status: 413, title: 'Source exceeds the byte limit' },
  ERR_SOURCE_UNSUPPORTED: { status: 415, title: 'Source format not supported' },
  ERR_SOURCE_CORRUPT: { status: 422, title: 'Source image is corrupt or truncated' },
  ERR_SOURCE_PIXELS_EXCEEDED: { status: 422, title: 'Source exceeds the pixel limit' },
  ERR_OUTPUT_TOO_LARGE: { status: 422, title: 'Requested output exceeds the limit' },
  ERR_ORIGIN_DISABLED: { status: 404, title: 'This origin is switched off' },
  ERR_UPSTREAM_FAILED: { status: 502, title: 'Upstream origin failed' },
  ERR_UPSTREAM_TIMEOUT: { status: 504, title: 'Upstream origin timed out' },
  ERR_UPSTREAM_FORBIDDEN: { status: 403, title: 'Upstream host not allowed' },
  ERR_SIGNATURE_REQUIRED: { status: 403, title: 'A valid signature is required' },
  ERR_SIGNATURE_INVALID: { status: 403, title: 'Signature does not match' },
  ERR_OVERLOADED: { status: 503, title: 'Service is busy; retry later' },
  ERR_RENDER_TIMEOUT: { status: 503, title: 'Rendering took too long' },
  ERR_RENDER_FAILED: { status: 500, title: 'Rendering failed' },
  ERR_NOT_FOUND: { status: 404, title: 'No such route' },
  ERR_METHOD_NOT_ALLOWED: { status: 405, title: 'Method not allowed' },
  ERR_INTERNAL: { status: 500, title: 'Internal error' },
  ERR_REQUEST_TOO_LARGE: { status: 413, title: 'Request body too large' },
  ERR_REQUEST_MEDIA_TYPE: { status: 415, title: 'Request body media type not supported' },
  ERR_NOT_READY: { status: 503, title: 'Service not ready' },
  ERR_LIMIT_SOURCE_DIMENSION: { status: 422, title: 'A side of the source exceeds the dimension limit' },
  ERR_LIMIT_SOURCE_FRAMES: { status: 422, title: 'Source has more animation frames than allowed' },
  ERR_LIMIT_OUTPUT_DIMENSION: { status: 422, title: 'A side of the requested output exceeds the dimension limit' },
  ERR_LIMIT_DECODE_TIMEOUT: { status: 503, title: 'Decoding the source took too long' },
  ERR_INGEST_TOO_LARGE: { status: 413, title: 'Upload exceeds the byte limit' },
  ERR_INGEST_EMPTY: { status: 400, title: 'Upload has no bytes' },
  ERR_INGEST_MEDIA_TYPE: { status: 415, title: 'Send image bytes (image/*) or JSON naming a source' },
  ERR_INGEST_READ_ONLY: { status: 403, title: 'Uploads are switched off (read-only origin)' },
  ERR_INGEST_JOBS_FULL: { status: 503, title: 'Too many ingest jobs in progress; retry later' },
  ERR_INGEST_JOB_NOT_FOUND: { status: 404, title: 'No such ingest job' },
  ERR_SERVICE_STOPPING: { status: 503, title: 'Service is shutting down; retry later' },
  ERR_REQUEST_MALFORMED: { status: 400, title: 'The request is not well-formed HTTP' },
  ERR_REQUEST_HEADERS_TOO_LARGE: { status: 431, title: 'Request headers too large' },
  ERR_REQUEST_LENGTH_MISMATCH: { status: 400, title: 'Request body length does not match Content-Length' },
  ERR_REQUEST_TIMEOUT: { status: 408, title: 'The request was not received in time' },
  ERR_INGEST_UNBOUND: { status: 403, title: 'A signed ingest URL must name what it ingests (digest or source)' },
  ERR_INGEST_DIGEST_MISMATCH: { status: 403, title: 'The upload is not the one the signed URL names' },
  ERR_INGEST_SOURCE_MISMATCH: { status: 403, title: 'The source is not the one the signed URL names' },
  ERR_INGEST_ABANDONED: { status: 503, title: 'The ingest job could not finish before the service stopped' },
  ERR_SOURCE_TOO_COSTLY: { status: 413, title: 'Rendering this source needs more memory than this replica admits' },
  // Never sent: the client has gone. Logged as the outcome of work it abandoned (status 499, common practice).
  ERR_REQUEST_ABANDONED: { status: 499, title: 'The client closed the request before the answer' },
  ERR_MEMORY_STUCK: { status: 503, title: 'Memory stays above its ceiling with no work admitted; restart this replica' },
  // Issue 13 (replicas): uploads as CMSs send them, the object store, deletion, callbacks.
  ERR_INGEST_MULTIPART: { status: 400, title: 'A multipart upload must carry exactly one file' },
  ERR_INGEST_QUEUE_DOWN: { status: 503, title: 'The job queue cannot be reached; retry later' },
  ERR_STORE_FAILED: { status: 502, title: 'The object store failed; retry later' },
  ERR_INGEST_CALLBACK_UNSIGNED: { status: 400, title: 'Callbacks need a signing key to sign their bodies' },
  ERR_PURGE_DOWN: { status: 503, title: 'Deletion cannot reach the other replicas (Redis is away); retry later' },
} as const satisfies Record<string, { status: number; title: string }>;

export type ErrorCode = keyof typeof errorCodes;

/** An error the service means to show: its code picks status and title; `detail` is for people. */
export class FoldwiseError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  /** Extra response headers (e.g. Retry-After on 503). */
  readonly headers?: Record<string, string>;

  constructor(
    code: ErrorCode,
    detail?: string,
    options?: { cause?: unknown; headers?: Record<string, string> },
  ) {
    super(detail ?? errorCodes[code].title, { cause: options?.cause });
    this.name = 'FoldwiseError';
    this.code = code;
    this.status = errorCodes[code].status;
    this.headers = options?.headers;
  }
}

export function isFoldwiseError(e: unknown): e is FoldwiseError {
  return e instanceof FoldwiseError;
}
