import { afterAll, describe, expect, it } from 'vitest';
import { renderRaster } from '../../../src/core/index.js';
import { setSimdEnabled } from '../../../src/core/simd/index.js';
import type { Channels, PixelRaster, Plan } from '../../../src/core/types.js';
import { planFor } from './helpers.js';

/** Seeded noise (a linear congruential generator), 8 or 16 bits; alpha varies across the image. */
function noise(width: number, height: number, channels: Channels, deep: boolean, seed: number): PixelRaster {
  const data = deep ? new Uint16Array(width * height * channels) : new Uint8Array(width * height * channels);
  let s = seed >>> 0;
  for (let i = 0; i < data.length; i++) {
    s = (s * 1664525 + 1013904223) >>> 0;
    data[i] = deep ? s >>> 16 : s >>> 24;
  }
  if (channels === 2 || channels === 4) {
    const max = deep ? 65535 : 255;
    // Opaque on the left third, then a ramp to fully transparent: the alpha path is taken.
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        data[(y * width + x) * channels + channels - 1] = x < width / 3 ? max : Math.round((max * (width - 1 - x)) / width);
      }
    }
  }
  return { data, width, height, channels };
}

/**
 * `src` with rows that arrive only when `rowAt` asks for them, as a decoder writing rows in order
 * would deliver them: the raster handed to the render holds the complement of every sample, and
 * rowAt fills row y of a separate buffer just before it answers. A row read from the raster's
 * own samples, or from the buffer before it was asked, changes the output.
 */
function arriving(src: PixelRaster) {
  const max = src.data instanceof Uint16Array ? 65535 : 255;
  const data = src.data.slice();
  for (let i = 0; i < data.length; i++) data[i] = max - data[i];
  const rows = data.slice();
  const n = src.width * src.channels;
  const asked: number[] = [];
  const rowAt = (y: number) => {
    asked.push(y);
    rows.set(src.data.subarray(y * n, y * n + n), y * n);
    return { data: rows, at: y * n };
  };
  return { raster: { ...src, data }, rowAt, asked };
}

const bytes = (r: PixelRaster) => Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength);

/** Rows asked in increasing order, each once (the contract of RenderOptions.rowAt). */
function expectIncreasing(asked: number[]): void {
  for (let i = 1; i < asked.length; i++) if (!(asked[i] > asked[i - 1])) expect(asked.slice(i - 1, i + 1)).toEqual('increasing');
}

afterAll(() => setSimdEnabled(true));

// 400x300 -> 80x60 is a factor of 5: one pyramid level; -> 300x225 (4/3) goes direct.
const plans: Array<[string, Plan]> = [
  ['400x300 -> 80x60 (pyramid)', planFor(400, 300, 80, 60)],
  ['400x300 -> 300x225 (direct)', planFor(400, 300, 300, 225)],
];

describe('renderRaster with rowAt (rows still arriving)', () => {
  it('the plans take the paths named', () => {
    expect(plans[0][1].y.pyramidLevels).toBe(1);
    expect(plans[1][1].y.pyramidLevels).toBe(0);
  });

  describe.each([['SIMD on', true], ['SIMD off', false]])('%s', (_label, simd) => {
    describe.each(plans)('%s', (_name, plan) => {
      const src = noise(400, 300, 3, false, 7);

      it('8-bit RGB: the same bytes as with the rows all there; rows asked in order, once each', () => {
        setSimdEnabled(simd);
        const ref = renderRaster(src, plan);
        const a = arriving(src);
        // The rows not yet arrived do show in the output when read (so the check below can fail).
        const early = renderRaster(arriving(src).raster, plan);
        const got = renderRaster(a.raster, plan, { rowAt: a.rowAt });
        setSimdEnabled(true);
        expect(bytes(early).equals(bytes(ref))).toBe(false);
        expect(bytes(got).equals(bytes(ref))).toBe(true);
        expect(a.asked.length).toBeGreaterThan(0);
        expect(a.asked[0]).toBe(0);
        expectIncreasing(a.asked);
        expect(a.asked.every((y) => Number.isInteger(y) && y >= 0 && y < 300)).toBe(true);
      });

      it('a band of the lower half asks no row at the top, and matches that band of the whole', () => {
        setSimdEnabled(simd);
        // Split as the pool splits a rendition between two workers (src/pool/render-pool.ts).
        const h = plan.targetHeight;
        const mid = h >> 1;
        const ref = renderRaster(src, plan, { rows: [mid, h] });
        const whole = renderRaster(src, plan);
        const a = arriving(src);
        const got = renderRaster(a.raster, plan, { rows: [mid, h], rowAt: a.rowAt });
        setSimdEnabled(true);
        expect(bytes(got).equals(bytes(ref))).toBe(true);
        expect(bytes(got).equals(bytes(whole).subarray(mid * plan.targetWidth * 3))).toBe(true);
        expect(a.asked[0]).toBeGreaterThan(0);
        expectIncreasing(a.asked);
      });

      it('16-bit grey: the same samples, rows asked in order', () => {
        setSimdEnabled(simd);
        const grey = noise(400, 300, 1, true, 11);
        const ref = renderRaster(grey, plan);
        const a = arriving(grey);
        const got = renderRaster(a.raster, plan, { rowAt: a.rowAt });
        setSimdEnabled(true);
        expect(got.data).toBeInstanceOf(Uint16Array);
        expect(bytes(got).equals(bytes(ref))).toBe(true);
        expectIncreasing(a.asked);
      });
    });
  });

  it('a row that never arrives (rowAt throws) stops the render with that error', () => {
    const src = noise(400, 300, 3, false, 17);
    const stop = new Error('the source stopped arriving');
    const asked: number[] = [];
    const n = 400 * 3;
    const rowAt = (y: number) => {
      asked.push(y);
      if (y >= 150) throw stop;
      return { data: src.data, at: y * n };
    };
    expect(() => renderRaster(src, plans[1][1], { rowAt })).toThrow(stop);
    expect(asked.at(-1)).toBe(150);
  });
});

describe('renderRaster with rowAt (a buffer of one row)', () => {
  /** rowAt over a buffer that holds only the row last asked for, at a varying offset. */
  function oneRowAtATime(src: PixelRaster) {
    const n = src.width * src.channels;
    const slot = src.data instanceof Uint16Array ? new Uint16Array(n + 7) : new Uint8Array(n + 7);
    const asked: number[] = [];
    const rowAt = (y: number) => {
      asked.push(y);
      slot.fill(0);
      const at = y % 7;
      slot.set(src.data.subarray(y * n, y * n + n), at);
      return { data: slot, at };
    };
    return { rowAt, asked };
  }

  describe.each([['SIMD on', true], ['SIMD off', false]])('%s', (_label, simd) => {
    it.each(plans)('%s: 8-bit RGB and 16-bit grey give the bytes of the whole raster; the raster\'s own samples are not needed', (_name, plan) => {
      setSimdEnabled(simd);
      for (const [channels, deep] of [[3, false], [1, true]] as const) {
        const src = noise(400, 300, channels, deep, 11);
        const ref = renderRaster(src, plan);
        const r = oneRowAtATime(src);
        const empty = { ...src, data: deep ? new Uint16Array(0) : new Uint8Array(0) };
        expect(bytes(renderRaster(empty, plan, { rowAt: r.rowAt })).equals(bytes(ref))).toBe(true);
        expectIncreasing(r.asked);
        const band = oneRowAtATime(src);
        const h = plan.targetHeight;
        const part = renderRaster(empty, plan, { rows: [h >> 1, h], rowAt: band.rowAt });
        const n = plan.targetWidth * channels;
        expect(bytes(part).equals(bytes({ ...ref, data: ref.data.subarray((h >> 1) * n) }))).toBe(true);
        expect(band.asked[0]).toBeGreaterThan(0);
      }
    });
  });

  it('refuses a source with alpha (its opacity check would read every row first)', () => {
    const src = noise(40, 30, 4, false, 3);
    expect(() => renderRaster(src, planFor(40, 30, 8, 6), { rowAt: oneRowAtATime(src).rowAt })).toThrow(RangeError);
  });
});
