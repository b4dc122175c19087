import { mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DiskTier } from '../../src/cache/disk.js';
import { entry } from './entry.js';

const key = (n: number) => n.toString(16).padStart(64, '0');

describe('DiskTier', () => {
  let dir: string;
  beforeEach(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-disk-'));
  });
  afterEach(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  it('round-trips an entry byte for byte, with its headers', async () => {
    const d = await DiskTier.open(dir, 1 << 20);
    const e = entry(777, 9);
    await d.set(key(1), e);
    const got = await d.get(key(1));
    expect(got?.body.equals(e.body)).toBe(true);
    expect(got?.etag).toBe(e.etag);
    expect(got?.headers).toEqual(e.headers);
    expect(await d.get(key(2))).toBeUndefined();
  });

  it('is found again by a new instance (survives a restart)', async () => {
    await (await DiskTier.open(dir, 1 << 20)).set(key(3), entry(50));
    const again = await DiskTier.open(dir, 1 << 20);
    expect(again.bytes).toBeGreaterThan(50);
    expect((await again.get(key(3)))?.body.length).toBe(50);
  });

  it('leaves no temporary files behind and stays within its byte bound', async () => {
    const d = await DiskTier.open(dir, 5000);
    for (let i = 0; i < 10; i++) await d.set(key(i), entry(1000, i));
    expect(d.bytes).toBeLessThanOrEqual(5000);
    expect(await d.get(key(0))).toBeUndefined(); // the oldest went first
    expect((await d.get(key(9)))?.body).toEqual(Buffer.alloc(1000, 9));
    await d.close();
    expect(await readdir(join(dir, 'tmp'))).toEqual([]);
  });

  it('treats a corrupt file as a miss and drops it', async () => {
    const d = await DiskTier.open(dir, 1 << 20);
    await d.set(key(4), entry(10));
    await writeFile(join(dir, key(4).slice(0, 2), `${key(4)}.fwc`), 'garbage');
    expect(await d.get(key(4))).toBeUndefined();
  });

  it('hashes keys that are not plain hex into safe file names', async () => {
    const d = await DiskTier.open(dir, 1 << 20);
    await d.set('../../etc/passwd', entry(5));
    expect((await d.get('../../etc/passwd'))?.body.length).toBe(5);
    const subs = (await readdir(dir)).filter((s) => s !== 'tmp');
    expect(subs.every((s) => /^[0-9a-f]{2}$/.test(s))).toBe(true);
  });
});
