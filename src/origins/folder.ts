import { constants, type Dirent } from 'node:fs';
import { type FileHandle, lstat, open, readdir, realpath, stat, unlink } from 'node:fs/promises';
import { join, relative, sep } from 'node:path';
import { FoldwiseError } from '../errors.js';
import { hasSourceExtension } from '../codec/formats.js';
import type { Origin, SourceBytes, SourceIdentity, SourceListing } from './types.js';
import { safeRelativePath } from './safe-path.js';

export interface FolderOriginOptions {
  /** Largest file read, in bytes; larger ones are refused with ERR_SOURCE_TOO_LARGE. */
  maxBytes?: number;
}

/** The most one read call asks for: the largest sources come in a few calls, each abortable between. */
export const READ_CALL_BYTES = 16 * 2 ** 20;

/**
 * The `size` bytes of an open file (fewer if it ended sooner), read in calls of up to
 * `callBytes` into one buffer; a signal aborted stops it between calls. FileHandle.readFile
 * reads in 512 KiB calls, each a trip through libuv's pool and back to the event loop: with
 * the cores busy each trip waits for the loop, and a 5 MB JPEG's origin span was 12-17 ms on
 * the way to its decode, 7-10 ms read whole (scripts/bench/timeline.ts, docs/speed.md).
 */
export async function readWhole(handle: FileHandle, size: number, signal?: AbortSignal, callBytes = READ_CALL_BYTES): Promise<Buffer> {
  const bytes = Buffer.allocUnsafe(size);
  let at = 0;
  while (at < size) {
    signal?.throwIfAborted();
    const { bytesRead } = await handle.read(bytes, at, Math.min(callBytes, size - at), at);
    if (bytesRead === 0) break;
    at += bytesRead;
  }
  return at === size ? bytes : bytes.subarray(0, at);
}

/** Listing stops after this many files, so a huge tree cannot stall a request. */
const maxListed = 10_000;

/**
 * Sources from a local folder. A path is checked lexically first (safeRelativePath), then
 * resolved through every symlink and accepted only when the real path stays under the real
 * root: a link that points out of the root is refused like `..`. Identity is size + mtime,
 * taken from the same open file the bytes are read from.
 */
export function createFolderOrigin(root: string, options: FolderOriginOptions = {}): Origin {
  let realRoot: string | undefined;
  const rootPath = async () => (realRoot ??= await realpath(root));

  async function resolve(path: string): Promise<{ key: string; file: string }> {
    const segments = safeRelativePath(path);
    const key = segments.join('/');
    if (!hasSourceExtension(key)) {
      throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', `"${key}" does not name an image file.`);
    }
    const base = await rootPath().catch((e: unknown) => {
      throw new FoldwiseError('ERR_SOURCE_NOT_FOUND', 'The source folder does not exist.', { cause: e });
    });
    const file = await realpath(join(base, ...segments)).catch((e: unknown) => {
      throw notFound(key, e);
    });
    if (!file.startsWith(base + sep)) {
      throw new FoldwiseError('ERR_SOURCE_PATH_INVALID', 'Source path refused: it leads outside the source folder.');
    }
    return { key, file };
  }

  const version = (size: number, mtimeMs: number) => `${size.toString(36)}-${Math.floor(mtimeMs).toString(36)}`;

  return {
    name: 'folder',

    async identify(path: string, signal?: AbortSignal): Promise<SourceIdentity> {
      signal?.throwIfAborted();
      const { key, file } = await resolve(path);
      const s = await stat(file).catch((e: unknown) => {
        throw notFound(key, e);
      });
      if (!s.isFile()) throw notFound(key);
      return { key, version: version(s.size, s.mtimeMs) };
    },

    async read(path: string, signal?: AbortSignal): Promise<SourceBytes> {
      signal?.throwIfAborted();
      const { key, file } = await resolve(path);
      // O_NOFOLLOW: the real path has no links left; one swapped in since is refused.
      const handle = await open(file, constants.O_RDONLY | constants.O_NOFOLLOW).catch((e: unknown) => {
        throw notFound(key, e);
      });
      try {
        const s = await handle.stat();
        if (!s.isFile()) throw notFound(key);
        if (options.maxBytes !== undefined && s.size > options.maxBytes) {
          throw new FoldwiseError('ERR_SOURCE_TOO_LARGE', `The source has ${s.size} bytes; the limit is ${options.maxBytes}.`);
        }
        const bytes = await readWhole(handle, s.size, signal);
        return { identity: { key, version: version(s.size, s.mtimeMs) }, bytes };
      } finally {
        // Not waited for: the bytes are read (or the read failed), and a close is one more trip
        // through libuv's pool before the decode may start.
        handle.close().catch(() => undefined);
      }
    },

    async remove(path: string): Promise<boolean> {
      const { key, file } = await resolve(path);
      const s = await lstat(file).catch(() => undefined);
      if (!s?.isFile()) return false;
      await unlink(file).catch((e: unknown) => {
        if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw notFound(key, e);
      });
      return true;
    },

    async list(): Promise<SourceListing[]> {
      const base = await rootPath().catch(() => undefined);
      if (!base) return [];
      const found: SourceListing[] = [];
      const walk = async (dir: string): Promise<void> => {
        let entries: Dirent[];
        try {
          entries = await readdir(dir, { withFileTypes: true });
        } catch {
          return; // unreadable folder: list what can be read
        }
        entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
        for (const e of entries) {
          if (found.length >= maxListed) return;
          if (e.name.startsWith('.')) continue;
          const full = join(dir, e.name);
          // Symlinks are not followed here: no cycles, nothing outside the root.
          if (e.isDirectory()) await walk(full);
          else if (e.isFile() && hasSourceExtension(e.name)) {
            const s = await stat(full).catch(() => undefined);
            if (!s) continue;
            const path = relative(base, full).split(sep).join('/');
            found.push({ path, bytes: s.size, modified: s.mtime.toISOString() });
          }
        }
      };
      await walk(base);
      return found;
    },
  };
}

function notFound(key: string, cause?: unknown): FoldwiseError {
  const code = (cause as { code?: string } | undefined)?.code;
  if (code === 'ELOOP') {
    return new FoldwiseError('ERR_SOURCE_PATH_INVALID', 'Source path refused: a link changed under it.', { cause });
  }
  if (code && !['ENOENT', 'ENOTDIR', 'EISDIR', 'EACCES', 'EPERM'].includes(code)) {
    return new FoldwiseError('ERR_INTERNAL', `The source "${key}" could not be read.`, { cause });
  }
  return new FoldwiseError('ERR_SOURCE_NOT_FOUND', `No source "${key}".`, { cause });
}
