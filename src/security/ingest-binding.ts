/**
 * What a signed ingest URL grants. The signature covers the path `/v1/ingest` and every query
 * parameter; the body is not signed, so the query must name it: `digest` (hex SHA-256 of the
 * uploaded bytes, FIPS 180-4) for an upload, or `source` for JSON naming a source in the
 * origin. Without one of them a signed URL would accept any body and mint signed rendition
 * URLs for it. An unsigned request (signing optional or off) may still carry them; they are
 * checked the same way.
 */
import { FoldwiseError } from '../errors.js';
import { digestOf } from '../ingest/store.js';

/** The binding parameters of the ingest query. */
export interface IngestBinding {
  digest?: string;
  source?: string;
}

/** Refuses a signed ingest URL that names neither a digest nor a source (before the body is read). */
export function requireBinding(binding: IngestBinding): void {
  if (binding.digest === undefined && binding.source === undefined) {
    throw new FoldwiseError(
      'ERR_INGEST_UNBOUND',
      'a signed ingest URL must name what it ingests: digest=<SHA-256 hex of the upload> or source=<path>; see foldwise sign --upload / --source',
    );
  }
}

/** Checks an upload against the binding; returns its digest (computed once, reused by the store). */
export function checkUpload(bytes: Uint8Array, binding: IngestBinding): string {
  if (binding.source !== undefined) {
    throw new FoldwiseError('ERR_INGEST_SOURCE_MISMATCH', 'this URL names a source; it cannot ingest uploaded bytes');
  }
  const digest = digestOf(bytes);
  if (binding.digest !== undefined && binding.digest !== digest) {
    throw new FoldwiseError('ERR_INGEST_DIGEST_MISMATCH', 'the SHA-256 of the uploaded bytes differs from the digest parameter');
  }
  return digest;
}

/** Checks a named source against the binding. */
export function checkSource(source: string, binding: IngestBinding): void {
  if (binding.digest !== undefined) {
    throw new FoldwiseError('ERR_INGEST_DIGEST_MISMATCH', 'this URL names uploaded bytes by digest; it cannot ingest a named source');
  }
  if (binding.source !== undefined && binding.source !== source) {
    throw new FoldwiseError('ERR_INGEST_SOURCE_MISMATCH', 'the source in the body differs from the source parameter');
  }
}
