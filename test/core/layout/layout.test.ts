import { describe, expect, it } from 'vitest';
import { layoutRendition, type LayoutRequest } from '../../../src/core/layout/index.js';

// Semantics: CSS Images Module Level 3, §5.5 object-fit (fill, contain, cover, scale-down)
// and §5.6 object-position, whose percentages mean what background-position's do (CSS
// Backgrounds and Borders Module Level 3, §3.6): offset = (box - image) x percentage.
const centre = { x: 0.5, y: 0.5 };
const req = (r: Partial<LayoutRequest>): LayoutRequest => ({ density: 1, fit: 'cover', position: centre, ...r });
const src = { width: 3000, height: 2000 };

describe('layoutRendition', () => {
  it('one side given: the other follows the aspect ratio, whatever the fit', () => {
    for (const fit of ['cover', 'contain', 'fill'] as const) {
      const l = layoutRendition(src, req({ width: 600, fit }));
      expect(l).toEqual({ targetWidth: 600, targetHeight: 400, crop: { x: 0, y: 0, width: 3000, height: 2000 } });
    }
    expect(layoutRendition(src, req({ height: 500 })).targetWidth).toBe(750);
  });

  it('cover crops the centre exactly and fractionally', () => {
    // 3000x2000 into 400x400: scale 0.2, visible 2000x2000, free 1000 px, half each side.
    const l = layoutRendition(src, req({ width: 400, height: 400 }));
    expect(l.targetWidth).toBe(400);
    expect(l.crop).toEqual({ x: 500, y: 0, width: 2000, height: 2000 });
    expect(l.canvas).toBeUndefined();
    // 3000x2000 into 700x300: k = max(700/3000, 300/2000) = 0.2333..; crop 3000 x 1285.714..
    const f = layoutRendition(src, req({ width: 700, height: 300 }));
    expect(f.crop.width).toBe(3000);
    expect(f.crop.height).toBeCloseTo((300 * 3000) / 700, 10);
    expect(f.crop.y).toBeCloseTo((2000 - (300 * 3000) / 700) / 2, 10);
    expect(Number.isInteger(f.crop.y)).toBe(false);
  });

  it('cover with position left top keeps the left-top corner, right bottom the opposite one', () => {
    const lt = layoutRendition(src, req({ width: 400, height: 400, position: { x: 0, y: 0 } }));
    expect(lt.crop).toEqual({ x: 0, y: 0, width: 2000, height: 2000 });
    const rb = layoutRendition({ width: 2000, height: 3000 }, req({ width: 400, height: 400, position: { x: 1, y: 1 } }));
    expect(rb.crop).toEqual({ x: 0, y: 1000, width: 2000, height: 2000 });
    const p = layoutRendition(src, req({ width: 400, height: 400, position: { x: 0.3, y: 0.7 } }));
    expect(p.crop.x).toBeCloseTo(300, 10); // 30 % of the 1000 px free space
  });

  it('cover scales both axes by one factor computed from the rounded target', () => {
    const l = layoutRendition({ width: 1001, height: 997 }, req({ width: 333, height: 127 }));
    expect(l.crop.width / l.targetWidth).toBeCloseTo(l.crop.height / l.targetHeight, 12);
    expect(l.crop.width).toBeLessThanOrEqual(1001);
    expect(l.crop.height).toBeLessThanOrEqual(997);
  });

  it('contain fits inside the box and places the picture by position', () => {
    const l = layoutRendition(src, req({ width: 400, height: 400, fit: 'contain' }));
    expect([l.targetWidth, l.targetHeight]).toEqual([400, 267]);
    expect(l.canvas).toEqual({ width: 400, height: 400, left: 0, top: 67 }); // (400 - 267) / 2 = 66.5 -> 67
    const top = layoutRendition(src, req({ width: 400, height: 400, fit: 'contain', position: { x: 0.5, y: 0 } }));
    expect(top.canvas?.top).toBe(0);
    const bottom = layoutRendition(src, req({ width: 400, height: 400, fit: 'contain', position: { x: 0.5, y: 1 } }));
    expect(bottom.canvas?.top).toBe(133);
    expect(bottom.crop).toEqual({ x: 0, y: 0, width: 3000, height: 2000 });
  });

  it('contain without bars needs no canvas', () => {
    expect(layoutRendition(src, req({ width: 300, height: 200, fit: 'contain' })).canvas).toBeUndefined();
  });

  it('fill distorts to the box and keeps the whole source', () => {
    const l = layoutRendition(src, req({ width: 100, height: 700, fit: 'fill' }));
    expect(l).toEqual({ targetWidth: 100, targetHeight: 700, crop: { x: 0, y: 0, width: 3000, height: 2000 } });
  });

  it('scale-down never upscales, and behaves as contain when shrinking', () => {
    const small = { width: 300, height: 200 };
    const up = layoutRendition(small, req({ width: 1200, height: 1200, fit: 'scale-down' }));
    expect([up.targetWidth, up.targetHeight]).toEqual([300, 200]);
    expect(up.canvas).toEqual({ width: 1200, height: 1200, left: 450, top: 500 });
    const one = layoutRendition(small, req({ width: 1200, fit: 'scale-down' }));
    expect([one.targetWidth, one.targetHeight]).toEqual([300, 200]);
    const down = layoutRendition(src, req({ width: 400, height: 400, fit: 'scale-down' }));
    expect(down).toEqual(layoutRendition(src, req({ width: 400, height: 400, fit: 'contain' })));
  });

  it('cover and fill do upscale', () => {
    const l = layoutRendition({ width: 30, height: 20 }, req({ width: 300, height: 300 }));
    expect(l.targetWidth).toBe(300);
    expect(l.crop).toEqual({ x: 5, y: 0, width: 20, height: 20 });
  });

  it('density multiplies both sides (srcset x descriptors, HTML Living Standard §4.8.4.2)', () => {
    const one = layoutRendition(src, req({ width: 300, height: 300, density: 2 }));
    expect([one.targetWidth, one.targetHeight]).toEqual([600, 600]);
    const half = layoutRendition(src, req({ width: 301, density: 0.5 }));
    expect([half.targetWidth, half.targetHeight]).toEqual([151, 100]); // 150.5 -> 151; 100.33 -> 100
    const contain = layoutRendition(src, req({ width: 200, height: 200, density: 1.5, fit: 'contain' }));
    expect(contain.canvas).toMatchObject({ width: 300, height: 300 });
  });

  it('never goes below 1 px', () => {
    const l = layoutRendition({ width: 10000, height: 10 }, req({ width: 100 }));
    expect(l.targetHeight).toBe(1);
    const c = layoutRendition({ width: 10000, height: 10 }, req({ width: 50, height: 50, fit: 'contain' }));
    expect(c.targetHeight).toBe(1);
  });

  it.each([
    [{ width: 0, height: 10 }, req({ width: 10 })],
    [{ width: Number.NaN, height: 10 }, req({ width: 10 })],
    [src, req({})],
    [src, req({ width: Number.NaN })],
    [src, req({ width: 10, density: 0 })],
    [src, req({ width: 10, position: { x: 1.5, y: 0 } })],
    [src, req({ width: 10, height: 10, fit: 'stretch' as never })],
  ])('refuses bad input with a RangeError (%#)', (s, r) => {
    expect(() => layoutRendition(s, r)).toThrow(RangeError);
  });
});

// The enlargement cap (our policy, README "Enlargement"): past maxScale the box shrinks by one
// factor. What each fit enlarges follows CSS Images 3 §5.5 (cover fills the box: the larger
// ratio; contain fits inside it: the smaller ratio).
describe('layoutRendition with maxScale', () => {
  const small = { width: 200, height: 100 };

  it('one side past the cap gets the source size, and says what was asked', () => {
    const l = layoutRendition(small, req({ width: 4000, maxScale: 1 }));
    expect([l.targetWidth, l.targetHeight]).toEqual([200, 100]);
    expect(l.clamped).toEqual({ width: 4000, height: 2000, scale: 20 });
    // density multiplies first: 150 x 2 = 300 px asked of a 200 px source.
    const d = layoutRendition(small, req({ width: 150, density: 2, maxScale: 1 }));
    expect([d.targetWidth, d.targetHeight, d.clamped?.width]).toEqual([200, 100, 300]);
  });

  it('at or below the cap nothing changes and nothing is reported', () => {
    const at = layoutRendition(small, req({ width: 200, maxScale: 1 }));
    expect(at).toEqual({ targetWidth: 200, targetHeight: 100, crop: { x: 0, y: 0, width: 200, height: 100 } });
    const twice = layoutRendition(small, req({ width: 400, maxScale: 2 }));
    expect([twice.targetWidth, twice.clamped]).toEqual([400, undefined]);
  });

  it('cover keeps the box shape and the crop, at no more than the cap', () => {
    // 200x100 into 400x400 cover: k = max(2, 4) = 4; at cap 1 the box is 100x100, the crop the
    // same centred 100x100 square of the source.
    const l = layoutRendition(small, req({ width: 400, height: 400, maxScale: 1 }));
    expect([l.targetWidth, l.targetHeight]).toEqual([100, 100]);
    expect(l.crop).toEqual({ x: 50, y: 0, width: 100, height: 100 });
    expect(l.clamped).toEqual({ width: 400, height: 400, scale: 4 });
  });

  it('contain shrinks the canvas with the picture; scale-down is never clamped', () => {
    // 200x100 contained in 800x800: k = min(4, 8) = 4; cap 2 halves the box to 400x400.
    const l = layoutRendition(small, req({ width: 800, height: 800, fit: 'contain', maxScale: 2 }));
    expect([l.targetWidth, l.targetHeight]).toEqual([400, 200]);
    expect(l.canvas).toEqual({ width: 400, height: 400, left: 0, top: 100 });
    const sd = layoutRendition(small, req({ width: 800, height: 800, fit: 'scale-down', maxScale: 1 }));
    expect([sd.targetWidth, sd.clamped]).toEqual([200, undefined]);
  });

  it('rounding never takes a side past the cap', () => {
    for (const [w, h] of [[1001, 997], [333, 127], [7, 3]]) {
      const l = layoutRendition({ width: w, height: h }, req({ width: 5000, height: 4001, maxScale: 1 }));
      expect(l.targetWidth / l.crop.width).toBeLessThanOrEqual(1 + 1e-12);
      expect(l.targetHeight / l.crop.height).toBeLessThanOrEqual(1 + 1e-12);
    }
    expect(() => layoutRendition(small, req({ width: 10, maxScale: 0.5 }))).toThrow(RangeError);
  });
});
