import { describe, expect, it } from 'vitest';
import { throughputRequest } from '../../scripts/bench/service.js';

describe('the throughput runs\' requests (npm run bench, renders per second)', () => {
  const names = ['a.jpg', 'b.jpg', 'c.jpg'];
  const keys = 3 * 600 * 5;

  it('never repeat a picture\'s width and quality, so every answer is a render and not a cache hit', () => {
    const seen = new Set<string>();
    for (let n = 0; n < keys; n++) {
      const r = throughputRequest(names, n);
      seen.add(`${r.name} ${r.width} ${r.quality}`);
      expect(r.name).toBe(names[n % 3]);
    }
    expect(seen.size).toBe(keys);
  });

  it('keep to widths 600-1199 px and qualities 77-81, below the default 82 of the renditions made before the runs', () => {
    const widths = new Set<number>();
    const qualities = new Set<number>();
    for (let n = 0; n < keys; n += 7) {
      const r = throughputRequest(names, n);
      widths.add(r.width);
      qualities.add(r.quality);
    }
    expect([Math.min(...widths), Math.max(...widths)]).toEqual([600, 1199]);
    expect([...qualities].sort()).toEqual([77, 78, 79, 80, 81]);
    // A refused request (503) also uses up its key, which a long run at many connections does quickly.
    expect(throughputRequest(names, 2000)).toEqual({ name: 'c.jpg', width: 600 + (666 % 600), quality: 78 });
  });

  it('refuse to go past the last new key rather than let a hit count as a render', () => {
    expect(throughputRequest(names, keys - 1)).toEqual({ name: 'c.jpg', width: 1199, quality: 81 });
    expect(() => throughputRequest(names, keys)).toThrow(`request ${keys} would repeat an earlier one's width and quality`);
  });
});
