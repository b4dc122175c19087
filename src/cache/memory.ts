import { LRUCache } from 'lru-cache';
import type { CacheEntry, CacheTier } from './types.js';

/** Bytes an entry holds in memory: the body plus a rough count for its headers and key. */
export function entrySize(key: string, entry: CacheEntry): number {
  let size = entry.body.length + key.length + entry.etag.length + entry.contentType.length + 64;
  for (const [k, v] of Object.entries(entry.headers)) size += k.length + v.length;
  return size;
}

/** L1: an in-process LRU bounded in bytes (lru-cache's maxSize), least recently used out first. */
export class MemoryTier implements CacheTier {
  readonly name = 'memory';
  private readonly lru: LRUCache<string, CacheEntry>;

  constructor(maxBytes: number) {
    if (!(maxBytes > 0)) throw new RangeError('MemoryTier needs maxBytes > 0');
    this.lru = new LRUCache<string, CacheEntry>({
      maxSize: maxBytes,
      // An entry larger than the whole budget is simply not kept (lru-cache skips it).
      maxEntrySize: maxBytes,
      sizeCalculation: (entry, key) => entrySize(key, entry),
    });
  }

  /** Bytes currently held. */
  get bytes(): number {
    return this.lru.calculatedSize;
  }

  get entries(): number {
    return this.lru.size;
  }

  async get(key: string): Promise<CacheEntry | undefined> {
    return this.lru.get(key);
  }

  async set(key: string, entry: CacheEntry): Promise<void> {
    this.lru.set(key, entry);
  }

  async delete(key: string): Promise<void> {
    this.lru.delete(key);
  }
}
