import type { CacheEntry } from '../../src/cache/types.js';

/** A cache entry whose body is `size` bytes of `fill`. */
export function entry(size: number, fill = 1): CacheEntry {
  return {
    body: Buffer.alloc(size, fill),
    contentType: 'image/png',
    etag: `"e-${size}-${fill}"`,
    headers: { 'rendition-plan': 'test' },
    createdAt: 1,
  };
}
