import { describe, expect, it } from 'vitest';
import { differingWindow, greyOf, zoomFactor } from '../../src/inspector/zoom.js';

/** A w x h grey picture from a formula. */
function picture(w: number, h: number, f: (x: number, y: number) => number): Float64Array {
  const p = new Float64Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) p[y * w + x] = f(x, y);
  return p;
}

describe('the window where the two copies differ most', () => {
  it('finds a patch of false stripes and ignores a tone shift over the whole picture', () => {
    // Both copies a flat grey, the second 20 levels lighter everywhere (a tone shift), and the
    // first with 2-px stripes of +-30 inside x 120..160, y 40..80 (false bands in one copy).
    const stripes = (x: number, y: number) => (x >= 120 && x < 160 && y >= 40 && y < 80 ? (x % 4 < 2 ? 30 : -30) : 0);
    const legacy = picture(200, 160, (x, y) => 100 + stripes(x, y));
    const foldwise = picture(200, 160, () => 120);
    const win = differingWindow(legacy, foldwise, 200, 160);
    expect(win.width).toBe(48);
    expect(win.height).toBe(48);
    // The 48 px window holds the whole 40 px patch: x in 112..120, y in 32..40 (8 + steps of 4).
    expect(win.x).toBeGreaterThanOrEqual(112);
    expect(win.x).toBeLessThanOrEqual(120);
    expect(win.y).toBeGreaterThanOrEqual(32);
    expect(win.y).toBeLessThanOrEqual(40);
    expect((win.x - 8) % 4).toBe(0);
    // Stripes of +-30 over 40 x 40 of 48 x 48 pixels: variance 900 x 1600/2304 = 625, spread 25.
    expect(win.spread).toBeCloseTo(25, 6);
  });

  it('reports no spread when the copies differ only by a constant', () => {
    const a = picture(64, 64, (x, y) => (x * 7 + y * 3) % 256);
    const b = picture(64, 64, (x, y) => ((x * 7 + y * 3) % 256) + 12);
    const win = differingWindow(a, b, 64, 64);
    expect(win.spread).toBeCloseTo(0, 9);
    expect(win).toMatchObject({ x: 8, y: 8, width: 48, height: 48 });
  });

  it('keeps 8 px off the edges, where kernels differ by their edge handling alone', () => {
    // A difference in the last pixel only is never inside a window: every window ties at
    // spread 0 and the first, 8 px in from the top left, is taken.
    const edge = picture(101, 77, (x, y) => (x === 100 && y === 76 ? 255 : 0));
    expect(differingWindow(edge, picture(101, 77, () => 0), 101, 77)).toMatchObject({ x: 8, y: 8, spread: 0 });
    // A pixel 8 px in from the right and bottom edges is inside the last window only, x 101 - 8 - 48.
    const inner = picture(101, 77, (x, y) => (x === 92 && y === 68 ? 255 : 0));
    expect(differingWindow(inner, picture(101, 77, () => 0), 101, 77)).toMatchObject({ x: 45, y: 21 });
  });

  it('reaches the edges of pictures too small for the inset, and fits those smaller than the window', () => {
    const edge = picture(60, 50, (x, y) => (x === 59 && y === 49 ? 255 : 0));
    expect(differingWindow(edge, picture(60, 50, () => 0), 60, 50)).toMatchObject({ x: 12, y: 2 });
    const tiny = differingWindow(picture(30, 36, () => 1), picture(30, 36, () => 0), 30, 36);
    expect(tiny).toMatchObject({ x: 0, y: 0, width: 30, height: 36 });
  });

  it('refuses pictures of another size than declared', () => {
    expect(() => differingWindow(new Float64Array(10), new Float64Array(12), 5, 2)).toThrow(RangeError);
  });

  it('reads grey levels with Rec. 709 luma weights (ITU-R BT.709)', () => {
    const rgba = [255, 0, 0, 255, 0, 255, 0, 255, 0, 0, 255, 255];
    const grey = greyOf(rgba, 3);
    expect(grey[0]).toBeCloseTo(0.2126 * 255, 9);
    expect(grey[1]).toBeCloseTo(0.7152 * 255, 9);
    expect(grey[2]).toBeCloseTo(0.0722 * 255, 9);
  });

  it('enlarges by a whole number close to a 288 px canvas, at least twice', () => {
    expect(zoomFactor({ width: 48, height: 48 })).toBe(6);
    expect(zoomFactor({ width: 30, height: 36 })).toBe(8);
    expect(zoomFactor({ width: 400, height: 200 })).toBe(2);
  });
});
