import { describe, expect, it } from 'vitest';
import { riskiestWindow, zoomFactor, type Geometry, type Grid } from '../../src/inspector/zoom.js';

/** A 4 x 4 grid, all cells 0.1 except the given ones. */
function grid(hot: Record<number, number>): Grid {
  const cells = new Array(16).fill(0.1);
  for (const [index, risk] of Object.entries(hot)) cells[Number(index)] = risk;
  return { columns: 4, rows: 4, cells };
}

/** 2000 x 2400 source, shrunk whole to 200 x 240 (scale 10 on both axes). */
const whole: Geometry = {
  sourceWidth: 2000,
  sourceHeight: 2400,
  crop: { x: 0, y: 0, width: 2000, height: 2400 },
  targetWidth: 200,
  targetHeight: 240,
};

describe('the enlarged window around the riskiest region', () => {
  it('centres on the hottest cell, mapped from source to output pixels', () => {
    // Cell (column 2, row 1) spans source x 1000..1500, y 600..1200: output 100..150, 60..120.
    const win = riskiestWindow(grid({ 6: 0.9 }), whole);
    expect(win).toEqual({ x: 101, y: 66, width: 48, height: 48, column: 2, row: 1, risk: 0.9 });
  });

  it('stays inside the rendition at its edges', () => {
    // Shrunk to 100 x 120 (scale 20), cell (3, 3) is output 75..100, 90..120; a window centred
    // on it (64..112, 81..129) would stick out right and below, so it is pushed back inside.
    const small: Geometry = { ...whole, targetWidth: 100, targetHeight: 120 };
    const win = riskiestWindow(grid({ 15: 0.8 }), small);
    expect(win).toMatchObject({ x: 52, y: 72, width: 48, height: 48, column: 3, row: 3 });
  });

  it('skips a hotter cell that the fit crop leaves out of the rendition', () => {
    // The rendition shows source x 0..1000, y 700..1200 at 200 x 100 (scale 5 on both axes).
    const band: Geometry = { ...whole, crop: { x: 0, y: 700, width: 1000, height: 500 }, targetHeight: 100 };
    const win = riskiestWindow(grid({ 0: 1, 5: 0.7 }), band);
    // Row 0 (y 0..600) lies outside; cell (1, 1) (x 500..1000, y 600..1200) shows as output
    // 100..200, 0..100, so the window centres on (150, 50).
    expect(win).toMatchObject({ column: 1, row: 1, risk: 0.7, x: 126, y: 26, width: 48, height: 48 });
  });

  it('shifts the window by the bars that contain puts around the picture', () => {
    const barred: Geometry = { ...whole, offset: { x: 40, y: 0 } };
    expect(riskiestWindow(grid({ 6: 0.9 }), barred)).toMatchObject({ x: 141, y: 66 });
  });

  it('uses the whole rendition when it is smaller than the window', () => {
    const tiny: Geometry = { ...whole, targetWidth: 30, targetHeight: 36 };
    expect(riskiestWindow(grid({ 9: 0.5 }), tiny)).toMatchObject({ x: 0, y: 0, width: 30, height: 36 });
  });

  it('enlarges by a whole number, at least twice', () => {
    expect(zoomFactor({ x: 0, y: 0, width: 48, height: 48, column: 0, row: 0, risk: 0 })).toBe(6);
    expect(zoomFactor({ x: 0, y: 0, width: 30, height: 36, column: 0, row: 0, risk: 0 })).toBe(8);
    expect(zoomFactor({ x: 0, y: 0, width: 400, height: 200, column: 0, row: 0, risk: 0 })).toBe(2);
  });
});
