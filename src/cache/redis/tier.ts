import { decodeEntry, encodeEntry } from '../entry-codec.js';
import { packValue, unpackValue } from '../pack.js';
import type { RedisLink } from './link.js';
import type { CacheEntry, CacheTier } from '../types.js';

export interface RedisTierOptions {
  /** Time to live of every entry. */
  ttlSeconds: number;
  /** Entries larger than this (encoded) are not stored; they stay in the tiers in front. */
  maxEntryBytes: number;
}

/** What the tier has done since start, for metrics and tests. */
export interface RedisTierCounts {
  hits: number;
  misses: number;
  stores: number;
  oversize: number;
  errors: number;
}

/**
 * The shared cache tier on Redis. Entries are stored binary-safe (see entry-codec), with a
 * TTL and a size cap. Every call goes through the link's circuit breaker with a time bound;
 * `get` and `set` reject on failure so the tiered cache can count it and carry on.
 */
export class RedisTier implements CacheTier {
  readonly name = 'redis';
  readonly counts: RedisTierCounts = { hits: 0, misses: 0, stores: 0, oversize: 0, errors: 0 };

  constructor(
    readonly link: RedisLink,
    private readonly options: RedisTierOptions,
  ) {
    if (!(options.ttlSeconds >= 1) || !(options.maxEntryBytes >= 1)) {
      throw new RangeError('redis tier: ttlSeconds >= 1 and maxEntryBytes >= 1');
    }
  }

  async get(key: string): Promise<CacheEntry | undefined> {
    const bytes = await this.getBytes(key);
    const entry = bytes && decodeEntry(bytes);
    if (entry) this.counts.hits += 1;
    else this.counts.misses += 1;
    return entry;
  }

  /** Each render reaches here once: the tiered cache's store is the one write path. */
  async set(key: string, entry: CacheEntry): Promise<void> {
    await this.setBytes(key, encodeEntry(entry));
  }

  async delete(key: string): Promise<void> {
    await this.tracked(this.link.call((c) => c.del(this.key(key))));
  }

  /** Stores any JSON-like value with typed arrays (e.g. a source's spectrum analysis). */
  async setValue(key: string, value: unknown): Promise<void> {
    await this.setBytes(key, packValue(value));
  }

  /** Reads a value stored by setValue; undefined when absent or unreadable. */
  async getValue<T>(key: string): Promise<T | undefined> {
    const bytes = await this.getBytes(key);
    if (!bytes) return undefined;
    try {
      return unpackValue<T>(bytes);
    } catch {
      return undefined;
    }
  }

  async close(): Promise<void> {
    await this.link.close();
  }

  /** Stores raw bytes with the TTL; false (and nothing stored) when over the size cap. */
  async setBytes(key: string, bytes: Buffer): Promise<boolean> {
    if (bytes.length > this.options.maxEntryBytes) {
      this.counts.oversize += 1;
      return false;
    }
    await this.tracked(this.link.call((c) => c.set(this.key(key), bytes, 'EX', this.options.ttlSeconds)));
    this.counts.stores += 1;
    return true;
  }

  /** The raw bytes stored under the key, or undefined. */
  async getBytes(key: string): Promise<Buffer | undefined> {
    const bytes = await this.tracked(this.link.call((c) => c.getBuffer(this.key(key))));
    return bytes ?? undefined;
  }

  private key(key: string): string {
    return `${this.link.namespace}c:${key}`;
  }

  private async tracked<T>(p: Promise<T>): Promise<T> {
    try {
      return await p;
    } catch (e) {
      this.counts.errors += 1;
      throw e;
    }
  }
}
