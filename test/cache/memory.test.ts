import { describe, expect, it } from 'vitest';
import { entrySize, MemoryTier } from '../../src/cache/memory.js';
import { entry } from './entry.js';

describe('MemoryTier', () => {
  it('returns what was stored', async () => {
    const m = new MemoryTier(1 << 20);
    await m.set('a', entry(100));
    expect((await m.get('a'))?.body.length).toBe(100);
    expect(await m.get('b')).toBeUndefined();
  });

  it('stays within its byte budget and evicts the least recently used entry first', async () => {
    const one = entrySize('k0', entry(1000));
    const m = new MemoryTier(one * 3); // room for three entries of this size
    await m.set('k0', entry(1000, 0));
    await m.set('k1', entry(1000, 1));
    await m.set('k2', entry(1000, 2));
    await m.get('k0'); // k0 is now more recent than k1
    await m.set('k3', entry(1000, 3));
    expect(m.bytes).toBeLessThanOrEqual(one * 3);
    expect(await m.get('k1')).toBeUndefined(); // LRU order: common practice (lru-cache docs)
    expect((await m.get('k0'))?.body[0]).toBe(0);
    expect((await m.get('k3'))?.body[0]).toBe(3);
  });

  it('does not keep an entry larger than the whole budget', async () => {
    const m = new MemoryTier(500);
    await m.set('big', entry(1000));
    expect(await m.get('big')).toBeUndefined();
    expect(m.bytes).toBe(0);
  });
});
