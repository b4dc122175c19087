import { createHash } from 'node:crypto';
import { packValue, unpackValue } from './pack.js';
import type { CacheEntry } from './types.js';

/**
 * Bumped when the stored shape of an entry changes; older bytes then read as a miss.
 * 2: the body's length and SHA-256 are stored and checked on every read.
 */
const ENTRY_VERSION = 2;

interface StoredEntry extends CacheEntry {
  v: number;
  length: number;
  sha256: string;
}

const sha256 = (body: Buffer): string => createHash('sha256').update(body).digest('hex');

/** A CacheEntry as bytes (binary-safe: the body is stored raw, not as text). */
export function encodeEntry(entry: CacheEntry): Buffer {
  const stored: StoredEntry = {
    v: ENTRY_VERSION,
    length: entry.body.length,
    sha256: sha256(entry.body),
    body: entry.body,
    contentType: entry.contentType,
    etag: entry.etag,
    headers: entry.headers,
    createdAt: entry.createdAt,
  };
  return packValue(stored);
}

/** Reverses encodeEntry; undefined when the bytes are not a whole, unaltered entry of this version. */
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
    typeof s.headers !== 'object' || s.headers === null || typeof s.createdAt !== 'number' ||
    s.body.length !== s.length || sha256(s.body) !== s.sha256
  ) {
    return undefined;
  }
  return { body: s.body, contentType: s.contentType, etag: s.etag, headers: s.headers, createdAt: s.createdAt };
}
