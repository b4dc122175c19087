import { describe, expect, it } from 'vitest';
import { DEFAULT_LADDER, heightFor, ladderFor } from '../../src/ingest/ladder.js';
import { buildSrcset } from '../../src/ingest/srcset.js';
import { parseSrcset, widthDescriptors } from './srcset-parse.js';

describe('ladderFor', () => {
  it('uses the default ladder capped at the source width, closed by the source width', () => {
    expect(ladderFor(1000)).toEqual([160, 320, 480, 640, 800, 1000]);
    expect(ladderFor(4000)).toEqual([...DEFAULT_LADDER]);
    expect(ladderFor(640)).toEqual([160, 320, 480, 640]);
    expect(ladderFor(100)).toEqual([100]);
  });

  it('sorts, dedupes and clamps requested widths, never upscaling', () => {
    expect(ladderFor(500, [800, 200, 200, 300])).toEqual([200, 300, 500]);
  });

  it('rejects non-integers and NaN', () => {
    expect(() => ladderFor(Number.NaN)).toThrow(RangeError);
    expect(() => ladderFor(100, [12.5])).toThrow(RangeError);
  });

  it('keeps the aspect ratio for heights', () => {
    expect(heightFor(1600, 1200, 320)).toBe(240);
    expect(heightFor(3000, 10, 160)).toBe(1);
  });
});

describe('buildSrcset', () => {
  it('reads back, the way the HTML standard parses it, with ascending w descriptors', () => {
    const s = buildSrcset([
      { url: '/v1/renditions/a.png?width=640&format=webp', width: 640 },
      { url: '/v1/renditions/a.png?width=160&format=webp', width: 160 },
      { url: '/v1/renditions/a.png?width=320&format=webp', width: 320 },
    ]);
    const parsed = parseSrcset(s);
    expect(parsed.map((c) => c.url)).toEqual([
      '/v1/renditions/a.png?width=160&format=webp',
      '/v1/renditions/a.png?width=320&format=webp',
      '/v1/renditions/a.png?width=640&format=webp',
    ]);
    expect(widthDescriptors(parsed)).toEqual([160, 320, 640]);
  });

  it('refuses URLs that would break the candidate list', () => {
    // HTML Living Standard: a candidate URL must not start or end with a comma.
    expect(() => buildSrcset([{ url: ',/x', width: 1 }])).toThrow(RangeError);
    expect(() => buildSrcset([{ url: '/a b', width: 1 }])).toThrow(RangeError);
  });
});
