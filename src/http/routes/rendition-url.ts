import { LRUCache } from 'lru-cache';
import type { RawQuery } from '../../schemas/query.js';
import { canonicalQuery } from '../../schemas/canonical.js';
import type { RenditionQuery } from '../../schemas/rendition.js';
import { sourcePathOf } from './path.js';

/** What a rendition URL asks for: the checked source path, the query, its canonical form. */
export interface RenditionUrl {
  readonly path: string;
  readonly query: Readonly<RenditionQuery>;
  readonly canonical: string;
}

export interface RenditionUrlReader {
  /**
   * Reads `url` (with Fastify's parse of its query string); throws what the checks throw.
   * `memoKey` replaces the URL as the memo's key when the query is not the URL's alone (a
   * width resolved from Client Hints: the URL and that width).
   */
  read(url: string, rawQuery: RawQuery, memoKey?: string): RenditionUrl;
  /** URLs remembered now. */
  readonly size: number;
}

/** Bytes a remembered URL is counted as: its UTF-16 characters plus the parsed query (rough). */
const entryOverheadBytes = 512;

/**
 * Reads rendition URLs through a bounded memo: a URL seen before skips the path checks, zod and
 * the canonical form. Sound because each of them depends only on the URL (the query string is
 * parsed from it, the options are fixed at registration). Only successes are remembered, so a
 * refused URL is checked afresh every time; the memo is an LRU bounded in bytes (`maxBytes`),
 * so distinct junk URLs evict each other instead of growing it. Results are frozen: every
 * request that shares one must not be able to change it for the others.
 */
export function renditionUrlReader(
  prefix: string,
  parse: (raw: RawQuery) => RenditionQuery,
  maxBytes = 4 * 2 ** 20,
): RenditionUrlReader {
  const memo = new LRUCache<string, RenditionUrl>({
    maxSize: maxBytes,
    sizeCalculation: (_value, url) => 2 * url.length + entryOverheadBytes,
  });
  return {
    read(url, rawQuery, memoKey = url) {
      const known = memo.get(memoKey);
      if (known) return known;
      const path = sourcePathOf(url, prefix);
      const query = parse(rawQuery);
      Object.freeze(query.position);
      Object.freeze(query.background);
      const request: RenditionUrl = Object.freeze({ path, query: Object.freeze(query), canonical: canonicalQuery(query) });
      memo.set(memoKey, request);
      return request;
    },
    get size() {
      return memo.size;
    },
  };
}
