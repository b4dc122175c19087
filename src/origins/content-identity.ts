import { LRUCache } from 'lru-cache';
import type { SourceBytes, SourceIdentity } from './types.js';

/** How long downloaded bytes wait for the read that follows their identify (one miss). */
const KEEP_MS = 10_000;

/**
 * For upstream sources without validators (no ETag, no Last-Modified), whose identity is the
 * SHA-256 of their bytes: remembers that identity for the identity TTL, so hits within it cost
 * no upstream request, and keeps the bytes identify() downloaded for the read of the same miss,
 * so a miss downloads the source once. Kept bytes are taken once, and bounded: at most two
 * sources of the byte limit, for at most KEEP_MS.
 */
export class ContentIdentities {
  private readonly identities?: LRUCache<string, SourceIdentity>;
  private readonly kept: LRUCache<string, SourceBytes>;

  constructor(ttlMs: number, maxBytes: number) {
    if (ttlMs > 0) this.identities = new LRUCache({ max: 10_000, ttl: ttlMs, ttlResolution: 0 });
    this.kept = new LRUCache<string, SourceBytes>({
      maxSize: 2 * maxBytes,
      sizeCalculation: (s) => Math.max(1, s.bytes.length),
      ttl: KEEP_MS,
    });
  }

  identity(key: string): SourceIdentity | undefined {
    return this.identities?.get(key);
  }

  remember(identity: SourceIdentity): void {
    this.identities?.set(identity.key, identity);
  }

  keep(source: SourceBytes): void {
    this.kept.set(source.identity.key, source);
  }

  /** The kept bytes of `key`, once. */
  take(key: string): SourceBytes | undefined {
    const source = this.kept.get(key);
    if (source) this.kept.delete(key);
    return source;
  }
}
