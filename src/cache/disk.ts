import { createHash, randomBytes } from 'node:crypto';
import { mkdir, readdir, readFile, rm, stat, unlink } from 'node:fs/promises';
import { join } from 'node:path';
import { LRUCache } from 'lru-cache';
import { decodeDiskEntry, encodeDiskEntry } from './disk-entry.js';
import { sweepStaleTemp, writeDurably } from './durable.js';
import type { CacheEntry, CacheTier, TierHealth } from './types.js';

const SUFFIX = '.fwc';

/** Error codes of a file system that has no room left (write(2): ENOSPC, EDQUOT). */
const FULL = new Set(['ENOSPC', 'EDQUOT']);

/** What the tier reports: a damaged entry it dropped, a write refused for want of space. */
export type DiskEvent =
  | { kind: 'corrupt'; key: string; detail: string }
  | { kind: 'full'; error: unknown };

export interface DiskTierOptions {
  /** How an entry reaches the disk; replaceable to test a full disk. */
  write?: typeof writeDurably;
}

/**
 * The embedded shared tier: one file per entry under a folder, bounded in bytes by an LRU index
 * that deletes the least recently used files. Survives restarts; shared by replicas on one host.
 * Each entry is written crash-safe (durable.ts) and carries its length and content hash
 * (disk-entry.ts), checked on every read: a damaged file is deleted and reads as a miss.
 */
export class DiskTier implements CacheTier {
  readonly name = 'disk';
  private readonly index: LRUCache<string, number>;
  private readonly tmp: string;
  private full: string | undefined;
  private readonly listeners: ((event: DiskEvent) => void)[] = [];

  private constructor(private readonly dir: string, maxBytes: number, private readonly options: DiskTierOptions) {
    // One temporary folder per instance: replicas sharing the folder never touch each other's.
    this.tmp = join(dir, 'tmp', `${process.pid}-${randomBytes(4).toString('hex')}`);
    this.index = new LRUCache<string, number>({
      maxSize: maxBytes,
      maxEntrySize: maxBytes,
      sizeCalculation: (size) => Math.max(1, size),
      dispose: (_size, key, reason) => {
        // Evictions happen inside a set and are not waited for; a get or delete unlinks its own file and waits.
        if (reason === 'evict') unlink(this.path(key)).catch(() => undefined);
      },
    });
  }

  /**
   * Opens (creating) the folder, sweeps temporary folders that crashed writers left, and
   * indexes the entries already there, oldest first. Rejects when the folder cannot be created
   * or written (the caller then runs without the tier).
   */
  static async open(dir: string, maxBytes: number, options: DiskTierOptions = {}): Promise<DiskTier> {
    if (!(maxBytes > 0)) throw new RangeError('DiskTier needs maxBytes > 0');
    const tier = new DiskTier(dir, maxBytes, options);
    await mkdir(tier.tmp, { recursive: true });
    await sweepStaleTemp(join(dir, 'tmp'), tier.tmp);
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

  /** Degraded while the last write found the disk full (cleared by the next write that fits). */
  health(): TierHealth {
    return this.full ? { ok: false, detail: `disk full: ${this.full}` } : { ok: true, detail: 'writable' };
  }

  /** Calls `listener` on each event (metrics, logs). */
  listen(listener: (event: DiskEvent) => void): void {
    this.listeners.push(listener);
  }

  private emit(event: DiskEvent): void {
    for (const l of this.listeners) l(event);
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
    const read = decodeDiskEntry(file);
    if (!read.ok) {
      // Never served: deleted before this returns (the next miss renders and stores it again),
      // counted if damaged.
      this.index.delete(fk);
      await unlink(this.path(fk)).catch(() => undefined);
      if (read.reason === 'corrupt') this.emit({ kind: 'corrupt', key: fk, detail: read.detail });
      return undefined;
    }
    if (!this.index.has(fk)) this.index.set(fk, file.length);
    else this.index.get(fk); // refresh recency
    return read.entry;
  }

  async set(key: string, entry: CacheEntry): Promise<void> {
    const fk = this.fileKey(key);
    const data = encodeDiskEntry(entry);
    const tmp = join(this.tmp, `${fk}.${randomBytes(6).toString('hex')}`);
    const write = this.options.write ?? writeDurably;
    try {
      await mkdir(join(this.dir, fk.slice(0, 2)), { recursive: true });
      // Recreated if a start elsewhere swept it while this instance was idle.
      await mkdir(this.tmp, { recursive: true });
      await write(tmp, this.path(fk), data);
    } catch (e) {
      if (FULL.has((e as NodeJS.ErrnoException).code ?? '')) {
        this.full = (e as Error).message;
        this.emit({ kind: 'full', error: e });
      }
      throw e;
    }
    this.full = undefined;
    this.index.set(fk, data.length);
  }

  /** Removes this instance's temporary folder. */
  async close(): Promise<void> {
    await rm(this.tmp, { recursive: true, force: true });
  }

  async delete(key: string): Promise<void> {
    const fk = this.fileKey(key);
    // Gone from the disk before this resolves: a deletion that answers first must not leave the
    // file for the next read to serve.
    this.index.delete(fk);
    await unlink(this.path(fk)).catch(() => undefined);
  }
}
