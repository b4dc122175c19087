import { mkdir, mkdtemp, readdir, readFile, rm, stat, truncate, utimes, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { type DiskEvent, DiskTier } from '../../src/cache/disk.js';
import { STALE_TEMP_MS, writeDurably } from '../../src/cache/durable.js';
import { entry } from './entry.js';

const key = (n: number) => n.toString(16).padStart(64, '0');
const fileOf = (dir: string, k: string) => join(dir, k.slice(0, 2), `${k}.fwc`);
const noSpace = () => Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });

describe('DiskTier integrity', () => {
  let dir: string;
  let events: DiskEvent[];
  const open = async (options = {}) => {
    const d = await DiskTier.open(dir, 1 << 20, options);
    d.listen((e) => events.push(e));
    return d;
  };
  beforeEach(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-disk-int-'));
    events = [];
  });
  afterEach(() => rm(dir, { recursive: true, force: true }));

  it('an entry cut to half its length: a miss, deleted, counted as corrupt', async () => {
    const d = await open();
    await d.set(key(1), entry(4000, 3));
    const file = fileOf(dir, key(1));
    await truncate(file, Math.floor((await stat(file)).size / 2));
    expect(await d.get(key(1))).toBeUndefined();
    await expect(stat(file)).rejects.toMatchObject({ code: 'ENOENT' });
    expect(events).toEqual([{ kind: 'corrupt', key: key(1), detail: expect.stringMatching(/the header says/) }]);
    expect(d.bytes).toBe(0);
  });

  it('a deleted entry is gone from the disk when delete resolves, whether indexed or not', async () => {
    const d = await open();
    await d.set(key(5), entry(4000, 3));
    await d.delete(key(5));
    await expect(stat(fileOf(dir, key(5)))).rejects.toMatchObject({ code: 'ENOENT' });
    // A file another replica on the host wrote (not in this instance's index) goes too.
    const other = await open();
    await other.set(key(6), entry(4000, 3));
    await d.delete(key(6));
    await expect(stat(fileOf(dir, key(6)))).rejects.toMatchObject({ code: 'ENOENT' });
    expect(d.bytes).toBe(0);
  });

  it('an entry of the right length with one body byte changed: a miss (content hash)', async () => {
    const d = await open();
    await d.set(key(2), entry(4000, 3));
    const file = fileOf(dir, key(2));
    const bytes = await readFile(file);
    bytes[bytes.length - 10] ^= 0x01;
    await writeFile(file, bytes);
    expect(await d.get(key(2))).toBeUndefined();
    expect(events.map((e) => e.kind === 'corrupt' && e.detail)).toEqual(['content hash does not match']);
  });

  it('an entry of the previous format (FWC1, no length or hash) is a miss and deleted, not counted as damage', async () => {
    const d = await open();
    const meta = Buffer.from(JSON.stringify({ contentType: 'image/png', etag: '"x"', headers: {}, createdAt: 1 }));
    const len = Buffer.alloc(4);
    len.writeUInt32BE(meta.length);
    await mkdir(join(dir, key(3).slice(0, 2)), { recursive: true });
    await writeFile(fileOf(dir, key(3)), Buffer.concat([Buffer.from('FWC1'), len, meta, Buffer.alloc(10, 1)]));
    expect(await d.get(key(3))).toBeUndefined();
    await expect(stat(fileOf(dir, key(3)))).rejects.toMatchObject({ code: 'ENOENT' });
    expect(events).toEqual([]);
  });

  it('sweeps temporary folders crashed writers left (older than the stale age) at start, and keeps fresh ones', async () => {
    const stale = join(dir, 'tmp', '4242-deadbeef');
    const fresh = join(dir, 'tmp', '4343-cafecafe');
    await mkdir(stale, { recursive: true });
    await writeFile(join(stale, `${key(9)}.abc`), 'half an entry');
    await mkdir(fresh, { recursive: true });
    const old = (Date.now() - STALE_TEMP_MS - 60_000) / 1000;
    await utimes(stale, old, old);
    const d = await open();
    const left = await readdir(join(dir, 'tmp'));
    expect(left).not.toContain('4242-deadbeef');
    expect(left).toContain('4343-cafecafe');
    await d.close();
  });

  it('a write that finds the disk full: rejected, counted, degraded; the next write that fits clears it', async () => {
    let full = true;
    const d = await open({ write: async (tmp: string, target: string, data: Buffer) => (full ? Promise.reject(noSpace()) : writeDurably(tmp, target, data)) });
    expect(d.health()).toEqual({ ok: true, detail: 'writable' });
    await expect(d.set(key(5), entry(100))).rejects.toMatchObject({ code: 'ENOSPC' });
    expect(events.map((e) => e.kind)).toEqual(['full']);
    expect(d.health()).toMatchObject({ ok: false, detail: expect.stringMatching(/disk full/) });
    expect(await d.get(key(5))).toBeUndefined();
    full = false;
    await d.set(key(5), entry(100));
    expect(d.health().ok).toBe(true);
    expect((await d.get(key(5)))?.body.length).toBe(100);
  });

  it('writeDurably leaves no temporary file when the rename fails', async () => {
    const tmp = join(dir, 'a.tmp');
    await expect(writeDurably(tmp, join(dir, 'missing-folder', 'b'), Buffer.from('x'))).rejects.toMatchObject({ code: 'ENOENT' });
    expect(await readdir(dir)).toEqual([]);
  });

  it('refuses to open where the folder cannot be created (the caller switches the tier off)', async () => {
    const file = join(dir, 'a-file');
    await writeFile(file, 'not a folder');
    await expect(DiskTier.open(join(file, 'cache'), 1 << 20)).rejects.toMatchObject({ code: 'ENOTDIR' });
  });
});
