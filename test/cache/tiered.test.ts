import { describe, expect, it } from 'vitest';
import { MemoryTier } from '../../src/cache/memory.js';
import { TieredCache } from '../../src/cache/tiered.js';
import type { CacheTier } from '../../src/cache/types.js';
import { entry } from './entry.js';

const broken: CacheTier = {
  name: 'broken',
  get: () => Promise.reject(new Error('down')),
  set: () => Promise.reject(new Error('down')),
};

describe('TieredCache', () => {
  it('answers from the first tier that has the key and promotes a lower hit', async () => {
    const l1 = new MemoryTier(1 << 20);
    const l2 = new MemoryTier(1 << 20);
    const cache = new TieredCache([l1, l2]);
    await l2.set('k', entry(10));
    expect((await cache.get('k'))?.tier).toBe('memory');
    expect((await l1.get('k'))?.etag).toBe('"e-10-1"'); // promoted
    expect(await cache.get('nope')).toBeUndefined();
  });

  it('writes every tier and reports the bytes each stored', async () => {
    const l1 = new MemoryTier(1 << 20);
    const l2 = new MemoryTier(1 << 20);
    const stored: number[] = [];
    await new TieredCache([l1, l2], undefined, (_tier, bytes) => stored.push(bytes)).set('k', entry(10));
    expect(stored).toEqual([10, 10]);
    expect((await l1.get('k'))?.body.length).toBe(10);
    expect((await l2.get('k'))?.body.length).toBe(10);
  });

  it('reports a failing tier and carries on as a miss', async () => {
    const errors: string[] = [];
    const l2 = new MemoryTier(1 << 20);
    const cache = new TieredCache([broken, l2], (tier, op) => errors.push(`${tier}:${op}`));
    await cache.set('k', entry(3));
    expect((await cache.get('k'))?.tier).toBe('memory');
    expect(errors).toEqual(['broken:set', 'broken:get', 'broken:set']);
  });
});
