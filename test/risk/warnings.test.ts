import { describe, expect, it } from 'vitest';
import { describeRegion } from '../../src/risk/regions.js';
import { writeWarnings, type WidthRisk } from '../../src/risk/warnings.js';

function grid(columns: number, rows: number, hot: Array<[number, number]>, value = 0.9) {
  const cells = new Float32Array(columns * rows).fill(0.01);
  for (const [c, r] of hot) cells[r * columns + c] = value;
  return { columns, rows, cells };
}

describe('describeRegion', () => {
  it('names the third of the picture where the hot cells are', () => {
    expect(describeRegion(grid(6, 6, [[0, 0], [1, 0], [0, 1]]))).toBe('the upper-left region');
    expect(describeRegion(grid(6, 6, [[5, 5]]))).toBe('the lower-right region');
    expect(describeRegion(grid(3, 3, [[1, 1]]))).toBe('the central region');
    expect(describeRegion(grid(6, 6, [[0, 0], [5, 5]]))).toMatch(/^the (upper-left|lower-right) and (upper-left|lower-right) regions$/);
  });

  it('says "most of the image" when the risk is everywhere, and nothing when nowhere', () => {
    const all: Array<[number, number]> = [];
    for (let r = 0; r < 4; r++) for (let c = 0; c < 4; c++) all.push([c, r]);
    expect(describeRegion(grid(4, 4, all))).toBe('most of the image');
    expect(describeRegion({ columns: 2, rows: 2, cells: [0, 0, 0, 0] })).toBeUndefined();
  });
});

describe('writeWarnings', () => {
  const base = { grid: grid(6, 6, [[0, 0]]), periodic: true, remedySigma: 2.13 };
  const ladder: WidthRisk[] = [
    { ...base, width: 320, level: 'high', score: 0.8 },
    { ...base, width: 160, level: 'high', score: 0.9 },
    { ...base, width: 480, level: 'low', score: 0.05 },
    { ...base, width: 640, level: 'low', score: 0.01 },
  ];

  // Never a larger width as the remedy: a thumbnail stays a thumbnail (the advice's cost says
  // from which width the pattern shows cleanly, as a fact).
  it('names width, region, what a viewer sees, and the advice with its cost', () => {
    const advice = { change: 'prefilter=auto', effect: 'removes the false bands', cost: 'the stripes become an even navy; they show cleanly from 640 px wide' };
    const seen = { pattern: 'folds into coarse bands 9.0 px apart (plainly visible)', advice };
    expect(writeWarnings(ladder.map((r) => ({ ...r, ...seen })))).toEqual([
      'at 160 px the upper-left region will show a pattern that folds into coarse bands 9.0 px apart (plainly visible); prefilter=auto removes the false bands: the stripes become an even navy; they show cleanly from 640 px wide',
      'at 320 px the upper-left region will show a pattern that folds into coarse bands 9.0 px apart (plainly visible); prefilter=auto removes the false bands: the stripes become an even navy; they show cleanly from 640 px wide',
    ]);
    for (const w of writeWarnings(ladder)) expect(w).not.toMatch(/480 px/);
  });

  it('is silent when every width is low risk', () => {
    expect(writeWarnings(ladder.map((r) => ({ ...r, level: 'low' as const })))).toEqual([]);
  });

  it('words broadband risk and moderate levels differently, and omits remedies it cannot offer', () => {
    const [w] = writeWarnings([{ ...base, width: 800, level: 'moderate', score: 0.4, periodic: false, remedySigma: undefined }]);
    expect(w).toBe('at 800 px the upper-left region may show, on close inspection, a pattern that shows jagged edges and sparkle (fine detail)');
  });
});
