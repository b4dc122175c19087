import { createHash } from 'node:crypto';
import { LRUCache } from 'lru-cache';
import type { SourceIdentity } from '../origins/types.js';

/**
 * Bump when anything changes the bytes of a rendition for the same request (core filters,
 * codec settings): old cache entries then stop matching instead of being served stale.
 */
// 5: the baseline JPEG encoder and the content cut-off, which two branches each called 4.
// 6: fit defaults to contain (was cover), so a URL with both sides and no fit gets new bytes.
// 7: this session: enlargement cap; ringing limiter; wide gamut as P3; animations kept; negotiated-bytes rule.
// 8: the pyramid's compensated final filter designed by turned cosines (compensate.ts): its
//    table moves by ~1e-12 of its peak, which may flip a float32 weight and so a byte.
export const pipelineVersion = 'fw-pipeline-8';

// Hits ask for the same few keys over and over; hashing is most of a hit's key cost. The memo
// maps the exact hashed text to its digest (so it cannot answer for different inputs) and is
// bounded in bytes.
const digests = new LRUCache<string, string>({
  maxSize: 8 * 2 ** 20,
  sizeCalculation: (_digest, text) => 2 * text.length + 192,
});

/**
 * The cache key of a rendition: the source's identity (key and version), the canonical query,
 * the format (or, when format is absent, what Accept allows), and the pipeline version; SHA-256 hex.
 */
export function renditionKey(identity: SourceIdentity, canonical: string, formatKey: string): string {
  const text = JSON.stringify([pipelineVersion, identity.key, identity.version, canonical, formatKey]);
  let key = digests.get(text);
  if (key === undefined) {
    key = createHash('sha256').update(text).digest('hex');
    digests.set(text, key);
  }
  return key;
}

/** A strong validator: the SHA-256 of the bytes, base64url, quoted (RFC 9110 §8.8.3). */
export function strongEtag(body: Buffer): string {
  return `"${createHash('sha256').update(body).digest('base64url').slice(0, 32)}"`;
}
