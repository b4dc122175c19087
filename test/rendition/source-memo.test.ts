import { describe, expect, it } from 'vitest';
import { SourceMemo } from '../../src/rendition/source-memo.js';
import type { ReadSource } from '../../src/rendition/source.js';

const source = (key: string, version: string, length: number, fill = 1): ReadSource => ({
  identity: { key, version },
  bytes: Buffer.alloc(length, fill),
});

describe('SourceMemo', () => {
  it('serves kept bytes for the very identity asked only: another version of the key is a miss', () => {
    const memo = new SourceMemo(1000);
    const v1 = source('a.jpg', 'size=100 mtime=1', 100);
    memo.keep(v1);
    expect(memo.get({ key: 'a.jpg', version: 'size=100 mtime=1' })).toBe(v1);
    expect(memo.get({ key: 'a.jpg', version: 'size=100 mtime=2' })).toBeUndefined();
    expect(memo.get({ key: 'b.jpg', version: 'size=100 mtime=1' })).toBeUndefined();
  });

  it('a newer version replaces the older one of its key (one copy per source)', () => {
    const memo = new SourceMemo(1000);
    memo.keep(source('a.jpg', 'v1', 100, 1));
    const v2 = source('a.jpg', 'v2', 120, 2);
    memo.keep(v2);
    expect(memo.get({ key: 'a.jpg', version: 'v1' })).toBeUndefined();
    expect(memo.get({ key: 'a.jpg', version: 'v2' })?.bytes[0]).toBe(2);
    expect(memo.bytes).toBe(120);
  });

  it('holds at most its bound, the least recently used going first, and keeps no source over a quarter of it', () => {
    const memo = new SourceMemo(1000);
    memo.keep(source('a.jpg', 'v', 250));
    memo.keep(source('big.jpg', 'v', 251)); // over a quarter: not kept
    expect(memo.get({ key: 'big.jpg', version: 'v' })).toBeUndefined();
    memo.keep(source('b.jpg', 'v', 250));
    memo.keep(source('c.jpg', 'v', 250));
    expect(memo.get({ key: 'a.jpg', version: 'v' })?.bytes.length).toBe(250); // a is now the most recent
    memo.keep(source('d.jpg', 'v', 250));
    expect(memo.bytes).toBe(1000);
    memo.keep(source('e.jpg', 'v', 250)); // b, the least recently used, goes
    expect(memo.get({ key: 'b.jpg', version: 'v' })).toBeUndefined();
    expect(['a.jpg', 'c.jpg', 'd.jpg', 'e.jpg'].map((key) => memo.get({ key, version: 'v' })?.bytes.length)).toEqual([250, 250, 250, 250]);
    expect(memo.bytes).toBe(1000);
  });

  it('lets bytes go once unused for its keep time (fake clock, no waiting)', () => {
    let now = 1000;
    const memo = new SourceMemo(1000, 500, () => now);
    memo.keep(source('a.jpg', 'v', 10));
    now += 400;
    expect(memo.get({ key: 'a.jpg', version: 'v' })?.bytes.length).toBe(10); // a use restarts its time
    now += 400;
    expect(memo.get({ key: 'a.jpg', version: 'v' })?.bytes.length).toBe(10);
    now += 501;
    expect(memo.get({ key: 'a.jpg', version: 'v' })).toBeUndefined();
  });
});
