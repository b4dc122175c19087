import { packValue, unpackValue } from './pack.js';
import type { CacheEntry } from './types.js';

/** Bumped when the stored shape of an entry changes; older bytes then read as a miss. */
const ENTRY_VERSION = 1;

interface StoredEntry extends CacheEntry {
  v: number;
}

/** A CacheEntry as bytes (binary-safe: the body is stored raw, not as text). */
export function encodeEntry(entry: CacheEntry): Buffer {
  const stored: StoredEntry = {
    v: ENTRY_VERSION,
    body: entry.body,
    contentType: entry.contentType,
    etag: entry.etag,
    headers: entry.headers,
    createdAt: entry.createdAt,
  };
  return packValue(stored);
}

/** Reverses encodeEntry; undefined when the bytes are not an entry of this version. */
export function decodeEntry(bytes: Buffer): CacheEntry | undefined {
  let s: Partial<StoredEntry>;
  try {
    s = unpackValue<Partial<StoredEntry>>(bytes);
  } catch {
    return undefined;
  }
  if (
    s === null || typeof s !== 'object' || s.v !== ENTRY_VERSION || !Buffer.isBuffer(s.body) ||
    typeof s.contentType !== 'string' || typeof s.etag !== 'string' ||
    typeof s.headers !== 'object' || s.headers === null || typeof s.createdAt !== 'number'
  ) {
    return undefined;
  }
  return { body: s.body, contentType: s.contentType, etag: s.etag, headers: s.headers, createdAt: s.createdAt };
}
