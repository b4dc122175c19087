/**
 * Which cache keys hold something made from a source (renditions of every version, its
 * spectrum), so that deleting the source can remove them: cache keys are digests and cannot
 * be found from the source's path. On Redis (shared by every replica: whoever rendered, the
 * key is found) a set per source with the tier's TTL; else a file per source beside the disk
 * cache, so the index outlives a restart as the disk entries do.
 */
import { createHash } from 'node:crypto';
import { appendFile, mkdir, readFile, unlink } from 'node:fs/promises';
import path from 'node:path';
import type { RedisLink } from './redis/link.js';

export interface SourceIndex {
  /** Notes that `key` holds something made from `source` (errors are the caller's to log). */
  record(source: string, key: string): Promise<void>;
  /** Every key noted for `source`, forgetting them. */
  take(source: string): Promise<string[]>;
}

const nameOf = (source: string) => createHash('sha256').update(source).digest('hex');

export class FileSourceIndex implements SourceIndex {
  private readonly dir: string;
  constructor(cacheDir: string) {
    this.dir = path.join(cacheDir, '.by-source');
  }

  async record(source: string, key: string): Promise<void> {
    await mkdir(this.dir, { recursive: true });
    // One short line per append: concurrent appends on a local file system do not interleave.
    await appendFile(path.join(this.dir, nameOf(source)), `${key}\n`);
  }

  async take(source: string): Promise<string[]> {
    const file = path.join(this.dir, nameOf(source));
    const text = await readFile(file, 'utf8').catch(() => '');
    await unlink(file).catch(() => undefined);
    return [...new Set(text.split('\n').filter((k) => k.length > 0))];
  }
}

export class RedisSourceIndex implements SourceIndex {
  constructor(
    private readonly link: RedisLink,
    private readonly ttlSeconds: number,
  ) {}

  private key(source: string): string {
    return `${this.link.namespace}src:${nameOf(source)}`;
  }

  async record(source: string, key: string): Promise<void> {
    const set = this.key(source);
    // The set lives as long as its newest entry may (the tier's TTL).
    await this.link.call((c) => c.multi().sadd(set, key).expire(set, this.ttlSeconds).exec());
  }

  async take(source: string): Promise<string[]> {
    const set = this.key(source);
    const result = await this.link.call((c) => c.multi().smembers(set).del(set).exec());
    const members = result?.[0]?.[1];
    return Array.isArray(members) ? (members as string[]) : [];
  }
}
