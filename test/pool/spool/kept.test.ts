import { describe, expect, it } from 'vitest';
import { type DecodeOf, type DecodedShape, KeptDecodes, keptBound } from '../../../src/pool/spool/kept.js';

const shape: DecodedShape = { width: 4, height: 2, channels: 3, depth: 8, format: 'jpeg' };
const of = (key: string, version = 'v1', wish = 'srgb 0'): DecodeOf => ({ key, version, wish });

/** A store whose removals and unholds are recorded, not done. */
function store(maxBytes: number, ttlMs?: number, now?: () => number) {
  const removed: string[] = [];
  const unheld: string[] = [];
  const kept = new KeptDecodes(maxBytes, async (path) => void removed.push(path), ttlMs, now);
  const keep = (o: DecodeOf, path: string, bytes: number) => kept.keep(o, path, shape, bytes, () => unheld.push(path));
  return { kept, keep, removed, unheld };
}

describe('KeptDecodes', () => {
  it('lends a kept file for the very decode asked only: another version or wish of the source is a miss', () => {
    const { kept, keep } = store(1000);
    expect(keep(of('twill.jpg'), '/spool/1.v', 100)).toBe(true);
    const lent = kept.lend(of('twill.jpg'));
    expect(lent?.path).toBe('/spool/1.v');
    expect(lent?.shape).toEqual(shape);
    expect(kept.lend(of('twill.jpg', 'v2'))).toBeUndefined();
    expect(kept.lend(of('twill.jpg', 'v1', 'source all'))).toBeUndefined();
    expect(kept.lend(of('brick.jpg'))).toBeUndefined();
  });

  it('a newer decode of a source replaces the older one, whose file is removed and no longer counted', async () => {
    const { kept, keep, removed, unheld } = store(1000);
    keep(of('twill.jpg', 'v1'), '/spool/1.v', 100);
    keep(of('twill.jpg', 'v2'), '/spool/2.v', 120);
    await kept.settled();
    expect(removed).toEqual(['/spool/1.v']);
    expect(unheld).toEqual(['/spool/1.v']);
    expect(kept.lend(of('twill.jpg', 'v2'))?.path).toBe('/spool/2.v');
    expect(kept.bytes).toBe(120);
  });

  it('holds at most its bound, the least recently used going first, and keeps no file over half of it', async () => {
    const { kept, keep, removed } = store(1000);
    expect(keep(of('big.jpg'), '/spool/big.v', 501)).toBe(false);
    keep(of('a.jpg'), '/spool/a.v', 400);
    keep(of('b.jpg'), '/spool/b.v', 400);
    kept.lend(of('a.jpg'))?.release(); // a is now the most recent
    keep(of('c.jpg'), '/spool/c.v', 400); // b goes
    await kept.settled();
    expect(removed).toEqual(['/spool/b.v']);
    expect(kept.bytes).toBe(800);
    expect(['a.jpg', 'b.jpg', 'c.jpg'].map((k) => kept.lend(of(k))?.path)).toEqual(['/spool/a.v', undefined, '/spool/c.v']);
  });

  it('never removes a file while a render reads it: a forgotten, lent file goes at its last release', async () => {
    const { kept, keep, removed, unheld } = store(1000);
    keep(of('label.jpg'), '/spool/l.v', 100);
    const one = kept.lend(of('label.jpg'))!;
    const two = kept.lend(of('label.jpg'))!;
    kept.forget('label.jpg');
    expect(kept.lend(of('label.jpg'))).toBeUndefined();
    await kept.settled();
    expect(removed).toEqual([]);
    one.release();
    one.release(); // a second release of one loan changes nothing
    await kept.settled();
    expect(removed).toEqual([]);
    two.release();
    await kept.settled();
    expect(removed).toEqual(['/spool/l.v']);
    expect(unheld).toEqual(['/spool/l.v']);
    expect(kept.bytes).toBe(0);
  });

  it('forgetting an unreadable file lets only that file go, not a newer decode kept meanwhile', async () => {
    const { kept, keep, removed } = store(1000);
    keep(of('brick.jpg', 'v1'), '/spool/old.v', 100);
    keep(of('brick.jpg', 'v2'), '/spool/new.v', 100);
    kept.forget('brick.jpg', '/spool/old.v');
    const lent = kept.lend(of('brick.jpg', 'v2'));
    expect(lent?.path).toBe('/spool/new.v');
    lent?.release();
    kept.forget('brick.jpg', '/spool/new.v');
    expect(kept.lend(of('brick.jpg', 'v2'))).toBeUndefined();
    await kept.settled();
    expect(removed).toEqual(['/spool/old.v', '/spool/new.v']);
  });

  it('clear lets every file go', async () => {
    const { kept, keep, removed } = store(1000);
    keep(of('a.jpg'), '/spool/a.v', 100);
    keep(of('b.jpg'), '/spool/b.v', 100);
    kept.clear();
    await kept.settled();
    expect(removed.sort()).toEqual(['/spool/a.v', '/spool/b.v']);
    expect(kept.bytes).toBe(0);
  });

  it('lets a file go once unused for its keep time (fake clock, no waiting)', async () => {
    let now = 1000;
    const { kept, keep, removed } = store(1000, 500, () => now);
    keep(of('a.jpg'), '/spool/a.v', 10);
    now += 400;
    kept.lend(of('a.jpg'))?.release(); // a use restarts its time
    now += 400;
    const lent = kept.lend(of('a.jpg'));
    expect(lent?.path).toBe('/spool/a.v');
    lent?.release();
    now += 501;
    expect(kept.lend(of('a.jpg'))).toBeUndefined();
    await kept.settled();
    expect(removed).toEqual(['/spool/a.v']);
  });
});

describe('KeptDecodes: decodes in progress', () => {
  it('a decode started is found by its very decode only, until it ends; a second start of it does not replace the first', async () => {
    const { kept } = store(1000);
    expect(kept.takes(500)).toBe(true);
    expect(kept.takes(501)).toBe(false);
    const end = kept.starts(of('twill.jpg'));
    const found = kept.decoding(of('twill.jpg'));
    expect(found).toBeInstanceOf(Promise);
    expect(kept.decoding(of('twill.jpg', 'v2'))).toBeUndefined();
    expect(kept.decoding(of('twill.jpg', 'v1', 'srgb all'))).toBeUndefined();
    const endSecond = kept.starts(of('twill.jpg'));
    expect(kept.decoding(of('twill.jpg'))).toBe(found);
    let settled = false;
    void found!.then(() => (settled = true));
    end();
    await found;
    expect(settled).toBe(true);
    expect(kept.decoding(of('twill.jpg'))).toBeUndefined();
    endSecond(); // ends its own, changes nothing else
    expect(kept.decoding(of('twill.jpg'))).toBeUndefined();
  });
});

describe('keptBound', () => {
  it('is the setting, at most a quarter of the spool folder', () => {
    expect(keptBound(128 * 2 ** 20, 64 * 1e6)).toBe(16 * 1e6); // Docker's default /dev/shm
    expect(keptBound(128 * 2 ** 20, 12 * 2 ** 30)).toBe(128 * 2 ** 20);
    expect(keptBound(0, 12 * 2 ** 30)).toBe(0);
    expect(keptBound(128 * 2 ** 20, Infinity)).toBe(128 * 2 ** 20);
  });
});
