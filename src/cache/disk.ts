import { createHash, randomBytes } from 'node:crypto';
import { mkdir, readdir, readFile, rename, rm, stat, unlink, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { LRUCache } from 'lru-cache';
import type { CacheEntry, CacheTier } from './types.js';

const MAGIC = Buffer.from('FWC1');
const SUFFIX = '.fwc';

interface Meta {
  contentType: string;
  etag: string;
  headers: Record<string, string>;
  createdAt: number;
}

/** File layout: "FWC1", uint32 BE meta length, meta JSON, body. */
function encode(entry: CacheEntry): Buffer {
  const meta: Meta = { contentType: entry.contentType, etag: entry.etag, headers: entry.headers, createdAt: entry.createdAt };
  const json = Buffer.from(JSON.stringify(meta));
  const len = Buffer.alloc(4);
  len.writeUInt32BE(json.length);
  return Buffer.concat([MAGIC, len, json, entry.body]);
}

function decode(file: Buffer): CacheEntry | undefined {
  if (file.length < 8 || !file.subarray(0, 4).equals(MAGIC)) return undefined;
  const len = file.readUInt32BE(4);
  if (8 + len > file.length) return undefined;
  const meta = JSON.parse(file.subarray(8, 8 + len).toString('utf8')) as Meta;
  return { ...meta, body: file.subarray(8 + len) };
}

/**
 * The embedded shared tier: one file per entry under a folder, written atomically (temporary
 * file, then rename) so a reader never sees half an entry, and bounded in bytes by an LRU index
 * that deletes the least recently used files. Survives restarts; shared by replicas on one host.
 */
export class DiskTier implements CacheTier {
  readonly name = 'disk';
  private readonly index: LRUCache<string, number>;
  private readonly tmp: string;

  private constructor(private readonly dir: string, maxBytes: number) {
    // One temporary folder per instance: replicas sharing the folder never touch each other's.
    this.tmp = join(dir, 'tmp', `${process.pid}-${randomBytes(4).toString('hex')}`);
    this.index = new LRUCache<string, number>({
      maxSize: maxBytes,
      maxEntrySize: maxBytes,
      sizeCalculation: (size) => Math.max(1, size),
      dispose: (_size, key, reason) => {
        if (reason === 'evict' || reason === 'delete') unlink(this.path(key)).catch(() => undefined);
      },
    });
  }

  /** Opens (creating) the folder and indexes the entries already there, oldest first. */
  static async open(dir: string, maxBytes: number): Promise<DiskTier> {
    if (!(maxBytes > 0)) throw new RangeError('DiskTier needs maxBytes > 0');
    const tier = new DiskTier(dir, maxBytes);
    await mkdir(tier.tmp, { recursive: true });
    const found: { key: string; size: number; mtime: number }[] = [];
    for (const sub of await readdir(dir)) {
      if (sub === 'tmp' || !/^[0-9a-f]{2}$/.test(sub)) continue;
      for (const name of await readdir(join(dir, sub)).catch(() => [] as string[])) {
        if (!name.endsWith(SUFFIX)) continue;
        const s = await stat(join(dir, sub, name)).catch(() => undefined);
        if (s) found.push({ key: name.slice(0, -SUFFIX.length), size: s.size, mtime: s.mtimeMs });
      }
    }
    found.sort((a, b) => a.mtime - b.mtime);
    for (const f of found) tier.index.set(f.key, f.size);
    return tier;
  }

  /** Bytes currently on disk (as indexed). */
  get bytes(): number {
    return this.index.calculatedSize;
  }

  /** Keys become file names: hex keys as they are, anything else hashed. */
  private fileKey(key: string): string {
    return /^[0-9a-f]{16,128}$/.test(key) ? key : createHash('sha256').update(key).digest('hex');
  }

  private path(fileKey: string): string {
    return join(this.dir, fileKey.slice(0, 2), fileKey + SUFFIX);
  }

  async get(key: string): Promise<CacheEntry | undefined> {
    const fk = this.fileKey(key);
    let file: Buffer;
    try {
      file = await readFile(this.path(fk));
    } catch {
      this.index.delete(fk);
      return undefined;
    }
    let entry: CacheEntry | undefined;
    try {
      entry = decode(file);
    } catch {
      entry = undefined;
    }
    if (!entry) {
      this.index.delete(fk); // unreadable: drop it rather than serve it
      return undefined;
    }
    if (!this.index.has(fk)) this.index.set(fk, file.length);
    else this.index.get(fk); // refresh recency
    return entry;
  }

  async set(key: string, entry: CacheEntry): Promise<void> {
    const fk = this.fileKey(key);
    const data = encode(entry);
    const tmp = join(this.tmp, `${fk}.${randomBytes(6).toString('hex')}`);
    await mkdir(join(this.dir, fk.slice(0, 2)), { recursive: true });
    await writeFile(tmp, data);
    try {
      await rename(tmp, this.path(fk));
    } catch (e) {
      await unlink(tmp).catch(() => undefined);
      throw e;
    }
    this.index.set(fk, data.length);
  }

  /** Removes this instance's temporary folder. */
  async close(): Promise<void> {
    await rm(this.tmp, { recursive: true, force: true });
  }

  async delete(key: string): Promise<void> {
    const fk = this.fileKey(key);
    if (this.index.has(fk)) this.index.delete(fk);
    else await unlink(this.path(fk)).catch(() => undefined);
  }
}
