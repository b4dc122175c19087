import { describe, expect, it } from 'vitest';
import { frameOf, makePlan, renderFrames, renderRaster, stackFrames } from '../../../src/core/index.js';
import type { PixelRaster } from '../../../src/core/types.js';

// Frames stacked in one raster (as the decoder gives an animation) must not bleed into each
// other: each frame's output keeps its own flat colour exactly (a flat field is preserved
// exactly by normalised weights, STYLE.md's invariant).

const side = 48;
const greys = [30, 220, 90];

function stack(): PixelRaster {
  const data = new Uint8Array(side * side * greys.length);
  greys.forEach((g, f) => data.fill(g, f * side * side, (f + 1) * side * side));
  return { data, width: side, height: side * greys.length, channels: 1 };
}

const plan = makePlan({ sourceWidth: side, sourceHeight: side, targetWidth: 12, targetHeight: 12, kernel: 'lanczos-3', prefilter: 'auto', light: 'linear' });

describe('frames', () => {
  it('frameOf views one frame without copying; stackFrames puts them back', () => {
    const s = stack();
    const second = frameOf(s, 3, 1);
    expect([second.width, second.height, second.data[0], second.data.buffer === s.data.buffer]).toEqual([side, side, 220, true]);
    expect(stackFrames([0, 1, 2].map((i) => frameOf(s, 3, i))).data).toEqual(s.data);
    expect(() => frameOf({ ...s, height: side * 3 - 1 }, 3, 0)).toThrow(RangeError);
  });

  it('each frame rendered alone keeps its own grey in every output row', async () => {
    const out = await renderFrames(stack(), 3, (f) => renderRaster(f, plan));
    expect([out.width, out.height]).toEqual([12, 36]);
    greys.forEach((g, f) => {
      const rows = Array.from(out.data.subarray(f * 144, (f + 1) * 144));
      expect(new Set(rows)).toEqual(new Set([g]));
    });
  });

  it('the stack resampled as one raster would bleed across the seams (what frame-by-frame prevents)', () => {
    const whole = makePlan({ sourceWidth: side, sourceHeight: 3 * side, targetWidth: 12, targetHeight: 36, kernel: 'lanczos-3', prefilter: 'auto', light: 'linear' });
    const out = renderRaster(stack(), whole);
    // The last row of frame 0 and the first of frame 1 read each other's rows.
    expect(out.data[11 * 12]).not.toBe(greys[0]);
    expect(out.data[12 * 12]).not.toBe(greys[1]);
  });
});
