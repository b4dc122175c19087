import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** Where spool files go when the setting is 'auto': memory-backed /dev/shm where it exists. */
function autoBase(): string {
  return existsSync('/dev/shm') ? '/dev/shm' : tmpdir();
}

const PREFIX = 'foldwise-spool-';

/** Whether process `pid` is alive on this host (EPERM: alive, someone else's). */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Removes spool folders left in `base` by processes that ended without closing them (killed,
 * crashed): their files would otherwise hold memory in a tmpfs until the next reboot. Best
 * effort: a folder this user may not remove (another user's, in a sticky /dev/shm) stays, and
 * spooling goes on beside it.
 */
function sweep(base: string): void {
  for (const name of readdirSync(base)) {
    const pid = Number(/^foldwise-spool-(\d+)-/.exec(name)?.[1]);
    if (!(pid > 0 && pid !== process.pid && !alive(pid))) continue;
    try {
      rmSync(join(base, name), { recursive: true, force: true });
    } catch {
      // Left for its owner.
    }
  }
}

/**
 * A private folder (mode 0700, made by mkdtemp) for the spool files of decodes in progress
 * (src/codec/spool-decode.ts writes one, the worker threads read it as it grows: pool/spool/rows.ts). Each render
 * gets a name of its own and removes its file when done; the folder goes with `close`.
 * A memory-backed file system (tmpfs) is best: the file never needs to reach a disk. The
 * folder's name carries the process id, so a later start can remove what a killed one left.
 */
export class SpoolDir {
  private next = 0;

  private constructor(readonly dir: string) {}

  /** The folder under `setting` ('auto', or a path), or null when it is 'off' or cannot be made. */
  static open(setting: string): SpoolDir | null {
    if (setting === 'off') return null;
    const base = setting === 'auto' ? autoBase() : setting;
    try {
      sweep(base);
      return new SpoolDir(mkdtempSync(join(base, `${PREFIX}${process.pid}-`)));
    } catch {
      return null;
    }
  }

  /** A fresh file name in the folder, ending in `.v` (libvips' own format). */
  path(): string {
    return join(this.dir, `${process.pid}-${this.next++}.v`);
  }

  /** Removes a file `path` gave (a writer still busy with it keeps writing to the unlinked file). */
  async remove(path: string): Promise<void> {
    await rm(path, { force: true });
  }

  /** Removes the folder and whatever is left in it. */
  close(): void {
    rmSync(this.dir, { recursive: true, force: true });
  }
}
