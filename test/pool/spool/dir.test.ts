import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SpoolDir } from '../../../src/pool/spool/dir.js';

describe('SpoolDir', () => {
  let base: string;
  beforeAll(async () => {
    base = await mkdtemp(join(tmpdir(), 'fw-spool-base-'));
  });
  afterAll(() => rm(base, { recursive: true, force: true }));

  it('makes a private folder named after this process, with distinct .v names, removed by close', () => {
    const spool = SpoolDir.open(base)!;
    expect(basename(spool.dir)).toMatch(new RegExp(`^foldwise-spool-${process.pid}-`));
    const a = spool.path();
    const b = spool.path();
    expect(a).not.toBe(b);
    expect(a.endsWith('.v') && a.startsWith(`${spool.dir}/`)).toBe(true);
    spool.close();
    expect(existsSync(spool.dir)).toBe(false);
  });

  it("removes folders of processes that have ended, and keeps live processes' and others'", async () => {
    // A process that has certainly ended: one started and waited for here.
    const gone = spawnSync(process.execPath, ['-e', 'process.pid']).pid!;
    const dead = join(base, `foldwise-spool-${gone}-abc123`);
    const live = join(base, `foldwise-spool-${process.ppid}-def456`);
    const other = join(base, 'unrelated-folder');
    for (const dir of [dead, live, other]) {
      await mkdir(dir);
      await writeFile(join(dir, '1-0.v'), 'left over');
    }
    const spool = SpoolDir.open(base)!;
    expect(existsSync(dead)).toBe(false);
    expect(existsSync(live)).toBe(true);
    expect(existsSync(other)).toBe(true);
    spool.close();
  });

  it("'off' and a folder that cannot be made give null (renders then decode in memory)", () => {
    expect(SpoolDir.open('off')).toBeNull();
    expect(SpoolDir.open(join(base, 'missing', 'deeper'))).toBeNull();
  });
});
