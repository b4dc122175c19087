/**
 * Crash-safe file writes and the sweep of what crashed writers leave behind.
 *
 * A rename is atomic (rename(2)), but on its own it does not make the new file's data durable:
 * after a power loss the new name may point at a file of zeros or of fewer bytes. So the data is
 * written to a temporary file and fsync'd, renamed over the final name, and then the folder is
 * fsync'd so the rename itself is on disk (fsync(2): "calling fsync() on the file does not
 * necessarily ensure that the entry in the directory containing the file has also reached
 * disk"). Common practice for crash-safe files.
 */
import { open, readdir, rename, rm, stat } from 'node:fs/promises';
import { dirname, join } from 'node:path';

/** Writes `data` to `tmp`, syncs it, renames it to `target` and syncs `target`'s folder. */
export async function writeDurably(tmp: string, target: string, data: Buffer): Promise<void> {
  try {
    const file = await open(tmp, 'wx');
    try {
      await file.writeFile(data);
      await file.sync();
    } finally {
      await file.close();
    }
    await rename(tmp, target);
  } catch (e) {
    // A write cut short (a full disk) leaves no partial temporary file behind.
    await rm(tmp, { force: true });
    throw e;
  }
  const folder = await open(dirname(target), 'r');
  try {
    await folder.sync();
  } finally {
    await folder.close();
  }
}

/** Temporary folders untouched this long belong to no live writer (a write takes milliseconds). */
export const STALE_TEMP_MS = 10 * 60 * 1000;

/**
 * Removes the entries of `tmpRoot` (other writers' temporary folders and files) that were not
 * modified for `staleMs`, except `keep`: what processes that died mid-write left. A live
 * replica's folder changes with each write; should an idle one's be swept, its next write
 * recreates it. Returns the names removed.
 */
export async function sweepStaleTemp(tmpRoot: string, keep: string, staleMs = STALE_TEMP_MS, now = Date.now()): Promise<string[]> {
  const removed: string[] = [];
  for (const name of await readdir(tmpRoot).catch(() => [] as string[])) {
    const path = join(tmpRoot, name);
    if (path === keep) continue;
    const s = await stat(path).catch(() => undefined);
    if (!s || now - s.mtimeMs < staleMs) continue;
    await rm(path, { recursive: true, force: true });
    removed.push(name);
  }
  return removed;
}
