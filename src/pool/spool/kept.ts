import { LRUCache } from 'lru-cache';

/** How long a kept decode waits for the next rendition of its source before its file goes. */
export const DECODE_KEEP_MS = 60_000;

/**
 * The kept decodes' bound in a spool folder whose file system holds `folderBytes`: the setting,
 * at most a quarter of the folder, so the decodes in progress keep their room (Docker gives a
 * container 64 MB of /dev/shm unless told otherwise; a full folder sends a render to the slower
 * in-memory decode).
 */
export function keptBound(setting: number, folderBytes: number): number {
  return Math.max(0, Math.min(setting, Math.floor(folderBytes / 4)));
}

/** The pixels a spool file holds (src/codec/spool-decode.ts's SpoolableSource, without its writer). */
export interface DecodedShape {
  width: number;
  height: number;
  channels: 1 | 3;
  depth: 8 | 16;
  format: string;
}

/** Which decode a file holds: the source's key and version, and the decode's wish (gamut, frames). */
export interface DecodeOf {
  key: string;
  version: string;
  wish: string;
}

/** A kept file lent to one render; release it when the render no longer reads it. */
export interface LentDecode {
  path: string;
  shape: DecodedShape;
  release(): void;
}

const idOf = (of: DecodeOf) => `${of.key}\n${of.version}\n${of.wish}`;

interface Entry {
  of: DecodeOf;
  path: string;
  shape: DecodedShape;
  bytes: number;
  /** Renders reading the file now: it is removed only once they are done. */
  readers: number;
  /** Out of the index (evicted, expired, replaced, forgotten): the file goes once unread. */
  out: boolean;
  /** Stops counting the file's bytes as spool memory (RenderPool.holdSpool). */
  unhold: () => void;
}

/**
 * Spool files of finished decodes (src/codec/spool-decode.ts), kept for the next rendition of
 * the same source: a page that goes live asks each picture at several widths within seconds,
 * and a site that pre-warms through the rendition route asks its widths one after the other
 * (the alias-risk report keeps its decode too: src/risk/kept-analysis.ts); each would decode the whole
 * source again, which for a large JPEG is most of a render's time. A kept file is lent for the
 * very decode asked (key, version and wish) and read as a finished spool file, so a rendition
 * from it has the bytes of one from a fresh decode. Bounded by bytes (least recently used go
 * first), each file at most half the bound; a file goes after DECODE_KEEP_MS unused, so an idle
 * replica gives the memory (a tmpfs, /dev/shm) back, and never while a render reads it.
 */
export class KeptDecodes {
  private readonly kept: LRUCache<string, Entry>;
  private readonly removals = new Set<Promise<void>>();
  /** Decodes in progress whose file will be kept, by idOf: each settles once its file is kept or gone. */
  private readonly inProgress = new Map<string, Promise<void>>();

  constructor(
    private readonly maxBytes: number,
    private readonly remove: (path: string) => Promise<void>,
    ttlMs = DECODE_KEEP_MS,
    now?: () => number,
  ) {
    this.kept = new LRUCache<string, Entry>({
      maxSize: maxBytes,
      sizeCalculation: (e) => Math.max(1, e.bytes),
      ttl: ttlMs,
      // Gone when due even if never asked again: the tmpfs pages are freed, not only hidden.
      ttlAutopurge: true,
      updateAgeOnGet: true,
      ttlResolution: 0,
      dispose: (e) => {
        e.out = true;
        if (e.readers === 0) this.drop(e);
      },
      ...(now ? { perf: { now } } : {}),
    });
  }

  /** The kept file of exactly this decode, lent until `release`; undefined when none is kept. */
  lend(of: DecodeOf): LentDecode | undefined {
    const e = this.kept.get(of.key);
    if (!e || e.of.version !== of.version || e.of.wish !== of.wish) return undefined;
    e.readers++;
    let lent = true;
    const release = () => {
      if (!lent) return;
      lent = false;
      e.readers--;
      if (e.out && e.readers === 0) this.drop(e);
    };
    return { path: e.path, shape: e.shape, release };
  }

  /**
   * Keeps the finished spool file at `path` (replacing what its source had kept); `unhold` is
   * called once the file is removed. False, having taken nothing, when the file is over half
   * the bound: the caller removes it as before.
   */
  keep(of: DecodeOf, path: string, shape: DecodedShape, bytes: number, unhold: () => void): boolean {
    if (!this.takes(bytes)) return false;
    this.kept.set(of.key, { of, path, shape, bytes, readers: 0, out: false, unhold });
    return true;
  }

  /** Whether a finished file of `bytes` would be kept (at most half the bound). */
  takes(bytes: number): boolean {
    return bytes * 2 <= this.maxBytes;
  }

  /**
   * Notes that the decode `of` has started, into a file to be kept; call the returned function
   * once that file is kept or gone. Meanwhile `decoding(of)` tells other renditions of the
   * source to wait for it rather than decode the source a second time beside it.
   */
  starts(of: DecodeOf): () => void {
    const id = idOf(of);
    let end!: () => void;
    const ended = new Promise<void>((resolve) => (end = resolve));
    if (!this.inProgress.has(id)) this.inProgress.set(id, ended);
    return () => {
      if (this.inProgress.get(id) === ended) this.inProgress.delete(id);
      end();
    };
  }

  /** Settles once the decode `of` in progress has ended (its file kept, or not); undefined when none is. */
  decoding(of: DecodeOf): Promise<void> | undefined {
    return this.inProgress.get(idOf(of));
  }

  /**
   * Lets a source's kept decode go (a deleted source); with `path`, only while that is the file
   * kept (one that could not be read back: a newer decode kept meanwhile stays).
   */
  forget(key: string, path?: string): void {
    if (path === undefined || this.kept.peek(key)?.path === path) this.kept.delete(key);
  }

  /** Lets every kept decode go (the spool folder is full: its space goes to the decodes in progress). */
  clear(): void {
    this.kept.clear();
  }

  /** Bytes of the files kept now (for metrics and tests). */
  get bytes(): number {
    return this.kept.calculatedSize;
  }

  /** Settles once every file let go so far is removed (for tests and shutdown). */
  async settled(): Promise<void> {
    await Promise.all([...this.removals]);
  }

  private drop(e: Entry): void {
    const removal = this.remove(e.path).catch(() => undefined).finally(e.unhold);
    this.removals.add(removal);
    void removal.finally(() => this.removals.delete(removal));
  }
}
