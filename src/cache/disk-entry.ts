/**
 * The disk tier's file format. Version 2 carries the entry's length and a SHA-256 of its
 * content in the header, so a file cut short (a crash before the data reached the disk, a full
 * disk, a copy gone wrong) or altered is recognised on every read, never served.
 *
 * Layout: "FWC2" | uint32 BE meta length | uint64 BE body length | SHA-256 of meta and body
 * (32 bytes) | meta JSON (UTF-8) | body. Version 1 ("FWC1") had neither length nor hash.
 */
import { createHash } from 'node:crypto';
import type { CacheEntry } from './types.js';

const MAGIC = Buffer.from('FWC2');
const OLDER = [Buffer.from('FWC1')];
const HEAD = 4 + 4 + 8 + 32;

interface Meta {
  contentType: string;
  etag: string;
  headers: Record<string, string>;
  createdAt: number;
}

export type DecodedFile =
  | { ok: true; entry: CacheEntry }
  /** 'stale': written by an older version of the format; 'corrupt': anything else wrong. */
  | { ok: false; reason: 'stale' | 'corrupt'; detail: string };

function digest(meta: Buffer, body: Buffer): Buffer {
  return createHash('sha256').update(meta).update(body).digest();
}

export function encodeDiskEntry(entry: CacheEntry): Buffer {
  const meta: Meta = { contentType: entry.contentType, etag: entry.etag, headers: entry.headers, createdAt: entry.createdAt };
  const json = Buffer.from(JSON.stringify(meta));
  const head = Buffer.alloc(HEAD);
  MAGIC.copy(head, 0);
  head.writeUInt32BE(json.length, 4);
  head.writeBigUInt64BE(BigInt(entry.body.length), 8);
  digest(json, entry.body).copy(head, 16);
  return Buffer.concat([head, json, entry.body]);
}

const corrupt = (detail: string): DecodedFile => ({ ok: false, reason: 'corrupt', detail });

/** Checks and reads a file: its version, its exact length, then its hash; then the meta. */
export function decodeDiskEntry(file: Buffer): DecodedFile {
  const magic = file.subarray(0, 4);
  if (OLDER.some((m) => m.equals(magic))) return { ok: false, reason: 'stale', detail: `format ${magic.toString('latin1')}` };
  if (file.length < HEAD || !magic.equals(MAGIC)) return corrupt('not a cache entry');
  const metaLength = file.readUInt32BE(4);
  const bodyLength = file.readBigUInt64BE(8);
  const expected = BigInt(HEAD + metaLength) + bodyLength;
  if (BigInt(file.length) !== expected) return corrupt(`${file.length} bytes, the header says ${expected}`);
  const json = file.subarray(HEAD, HEAD + metaLength);
  const body = file.subarray(HEAD + metaLength);
  if (!digest(json, body).equals(file.subarray(16, HEAD))) return corrupt('content hash does not match');
  let meta: Meta;
  try {
    meta = JSON.parse(json.toString('utf8')) as Meta;
  } catch {
    return corrupt('meta is not JSON');
  }
  if (typeof meta.contentType !== 'string' || typeof meta.etag !== 'string' || typeof meta.headers !== 'object' || meta.headers === null) {
    return corrupt('meta lacks fields');
  }
  return { ok: true, entry: { ...meta, body } };
}
