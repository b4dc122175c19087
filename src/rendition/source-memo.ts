import { LRUCache } from 'lru-cache';
import type { SourceIdentity } from '../origins/types.js';
import type { ReadSource } from './source.js';

/** How long kept bytes wait for the next rendition of their source before they are let go. */
export const SOURCE_KEEP_MS = 60_000;

/**
 * The bytes of sources read lately, so the next rendition of the same picture (a further
 * width, another format, the alias-risk report and then the rendition) skips the origin read:
 * a page that goes live is asked its pictures at several widths within seconds, and each miss
 * would read (from an upstream: download) the whole source again. Kept by path, served only for
 * the very version asked (the identity the caller has just learnt: size + mtime, ETag), so a
 * source replaced is read again. Bounded by bytes (least recently used go first); a source
 * larger than a quarter of the bound is not kept; entries go after SOURCE_KEEP_MS unused, so
 * an idle replica gives the memory back.
 */
export class SourceMemo {
  private readonly kept: LRUCache<string, ReadSource>;

  constructor(
    private readonly maxBytes: number,
    ttlMs = SOURCE_KEEP_MS,
    now?: () => number,
  ) {
    this.kept = new LRUCache<string, ReadSource>({
      maxSize: maxBytes,
      sizeCalculation: (s) => Math.max(1, s.bytes.length),
      ttl: ttlMs,
      // Gone when due even if never asked again: the memory is freed, not only hidden.
      ttlAutopurge: true,
      updateAgeOnGet: true,
      // Read the clock on every look-up (no coarse caching of "now").
      ttlResolution: 0,
      ...(now ? { perf: { now } } : {}),
    });
  }

  /** The kept bytes of exactly this identity (its key and version), else undefined. */
  get(identity: SourceIdentity): ReadSource | undefined {
    const source = this.kept.get(identity.key);
    return source && source.identity.version === identity.version ? source : undefined;
  }

  /** Keeps a source just read (replacing an older version of its key), unless it is too large. */
  keep(source: ReadSource): void {
    if (source.bytes.length * 4 > this.maxBytes) return;
    this.kept.set(source.identity.key, source);
  }

  /** Lets a source's bytes go (a deleted source: they are never served again, and not held either). */
  forget(key: string): void {
    this.kept.delete(key);
  }

  /** Bytes held now (for tests and metrics). */
  get bytes(): number {
    return this.kept.calculatedSize;
  }
}
