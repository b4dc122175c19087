import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SpoolDir } from '../../../src/pool/spool/dir.js';

/** chattr (e2fsprogs) on `dir`; false where the tool, the file system or the privilege is missing. */
const chattr = (flag: '+i' | '-i', dir: string) => spawnSync('chattr', [flag, dir]).status === 0;

describe('SpoolDir.open when a folder left by an ended process cannot be removed', () => {
  let base: string;
  let stuck: string;
  let immutable = false;
  beforeAll(async () => {
    base = await mkdtemp(join(tmpdir(), 'fw-spool-sweep-'));
    const gone = spawnSync(process.execPath, ['-e', 'process.pid']).pid!;
    stuck = join(base, `foldwise-spool-${gone}-ghi789`);
    await mkdir(stuck);
    await writeFile(join(stuck, '1-0.v'), 'left over');
    // Stands for another user's folder in a sticky /dev/shm, which this user may not remove.
    immutable = chattr('+i', stuck);
  });
  afterAll(async () => {
    if (immutable) chattr('-i', stuck);
    await rm(base, { recursive: true, force: true });
  });

  it('still spools: the sweep is best effort', (ctx) => {
    // Making a folder immutable takes root (CAP_LINUX_IMMUTABLE) and a file system that has the flag.
    if (!immutable) ctx.skip();
    const spool = SpoolDir.open(base);
    expect(spool).not.toBeNull();
    expect(existsSync(spool!.dir)).toBe(true);
    expect(existsSync(stuck)).toBe(true);
    spool!.close();
  });
});
