import { createHash } from 'node:crypto';
import type { SourceIdentity } from '../origins/types.js';

/**
 * Bump when anything changes the bytes of a rendition for the same request (core filters,
 * codec settings): old cache entries then stop matching instead of being served stale.
 */
export const pipelineVersion = 'fw-pipeline-1';

/**
 * The cache key of a rendition: the source's identity (key and version), the canonical query,
 * the format (or, for format=auto, what Accept allows), and the pipeline version; SHA-256 hex.
 */
export function renditionKey(identity: SourceIdentity, canonical: string, formatKey: string): string {
  return createHash('sha256')
    .update(JSON.stringify([pipelineVersion, identity.key, identity.version, canonical, formatKey]))
    .digest('hex');
}

/** A strong validator: the SHA-256 of the bytes, base64url, quoted (RFC 9110 §8.8.3). */
export function strongEtag(body: Buffer): string {
  return `"${createHash('sha256').update(body).digest('base64url').slice(0, 32)}"`;
}
