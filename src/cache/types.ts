/** One cached rendition (or analysis): the bytes and what is needed to answer from them. */
export interface CacheEntry {
  body: Buffer;
  contentType: string;
  /** Strong validator, quoted, e.g. "\"fw1-3f2a...\"". */
  etag: string;
  /** Extra response headers to replay on a hit (e.g. Rendition-Plan). */
  headers: Record<string, string>;
  /** ms since epoch. */
  createdAt: number;
}

/** A tier of the cache (memory, disk, Redis). Misses resolve undefined; failures may reject. */
export interface CacheTier {
  readonly name: string;
  get(key: string): Promise<CacheEntry | undefined>;
  set(key: string, entry: CacheEntry): Promise<void>;
  delete?(key: string): Promise<void>;
  close?(): Promise<void>;
  /** Whether the tier works as it should, where it can tell. */
  health?(): TierHealth;
}

/** Whether a tier works as it should; a tier that is not ok degrades readiness, never fails it. */
export interface TierHealth {
  ok: boolean;
  detail: string;
}
