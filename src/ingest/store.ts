/**
 * The content-addressed upload store: uploaded bytes land in the folder origin under a key
 * derived from their SHA-256 (FIPS 180-4), so the same bytes always get the same key and a
 * second upload writes nothing.
 */
import { createHash, randomBytes } from 'node:crypto';
import { mkdir, rename, stat, unlink, writeFile } from 'node:fs/promises';
import path from 'node:path';

export interface KeyScheme {
  /** Folder under the origin root, e.g. "uploads" (no leading or trailing slash). */
  prefix: string;
  /** Hex characters of the digest kept in the name (16..64). */
  digestChars: number;
}

/** Hex SHA-256 of the bytes. */
export function digestOf(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** The origin key for bytes with this digest and file extension, e.g. "uploads/3fa9….webp". */
export function keyFor(digest: string, ext: string, scheme: KeyScheme): string {
  if (!/^[0-9a-f]{64}$/.test(digest)) throw new RangeError('digest must be 64 hex characters');
  if (!/^[a-z0-9]{1,5}$/.test(ext)) throw new RangeError(`bad extension "${ext}"`);
  const prefix = scheme.prefix.replace(/^\/+|\/+$/g, '');
  const name = `${digest.slice(0, scheme.digestChars)}.${ext}`;
  return prefix ? `${prefix}/${name}` : name;
}

/**
 * Writes `bytes` to `root/key` unless a file of the same size is already there (same digest
 * prefix and size: the same upload). Writes to a temporary name and renames, so a reader never
 * sees half a file. Returns whether it wrote.
 */
export async function storeOnce(root: string, key: string, bytes: Uint8Array): Promise<boolean> {
  const rootAbs = path.resolve(root);
  const target = path.resolve(rootAbs, key);
  if (!target.startsWith(rootAbs + path.sep)) throw new RangeError(`key escapes the origin root: ${key}`);
  const existing = await stat(target).catch(() => undefined);
  if (existing?.isFile() && existing.size === bytes.byteLength) return false;
  await mkdir(path.dirname(target), { recursive: true });
  const temp = `${target}.${randomBytes(6).toString('hex')}.part`;
  try {
    await writeFile(temp, bytes, { flag: 'wx' });
    await rename(temp, target);
  } catch (e) {
    await unlink(temp).catch(() => undefined);
    throw e;
  }
  return true;
}
