import { afterAll, describe, expect, it } from 'vitest';
import { renderRaster } from '../../../src/core/index.js';
import { setSimdEnabled } from '../../../src/core/simd/index.js';
import type { PixelRaster } from '../../../src/core/types.js';
import { planFor } from './helpers.js';

/** Seeded noise (a linear congruential generator), 8-bit RGB: every rounding shows. */
function noise(width: number, height: number): PixelRaster {
  const data = new Uint8Array(width * height * 3);
  for (let i = 0, s = 5; i < data.length; i++) data[i] = (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) >>> 24;
  return { data, width, height, channels: 3 };
}

const bytes = (r: PixelRaster) => Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength);

afterAll(() => setSimdEnabled(true));

// 400x300 -> 80x60 takes one pyramid level; -> 139x104 (a factor of 2.88) goes direct.
describe.each([['pyramid', planFor(400, 300, 80, 60)], ['direct', planFor(400, 300, 139, 104)]])('renderRaster with `more` (a live end), %s', (_name, plan) => {
  const src = noise(400, 300);
  const h = plan.targetHeight;
  const w = plan.targetWidth * 3;

  it.each([['SIMD on', true], ['SIMD off', false]])('%s: lowered mid-band, it stops there; its rows and the rest made apart are the whole', (_l, simd) => {
    setSimdEnabled(simd);
    const whole = renderRaster(src, plan);
    const split = 23;
    const asked: number[] = [];
    // The end is lowered while the band runs (as the pool does from another thread).
    let end = h;
    const head = renderRaster(src, plan, { rows: [0, h], more: (o) => (asked.push(o), o === 10 && (end = split), o < end) });
    const rest = renderRaster(src, plan, { rows: [split, h] });
    setSimdEnabled(true);
    expect(head.height).toBe(split);
    expect(asked[0]).toBe(1);
    expect(asked[asked.length - 1]).toBe(split);
    expect(bytes(head).equals(bytes(whole).subarray(0, split * w))).toBe(true);
    expect(Buffer.concat([bytes(head), bytes(rest)]).equals(bytes(whole))).toBe(true);
  });

  it('a band asks before each row but its first, and one never lowered makes all its rows', () => {
    const asked: number[] = [];
    const band = renderRaster(src, plan, { rows: [7, h], more: (o) => (asked.push(o), true) });
    expect(asked).toEqual(Array.from({ length: h - 8 }, (_, i) => 8 + i));
    expect(bytes(band).equals(bytes(renderRaster(src, plan, { rows: [7, h] })))).toBe(true);
  });
});

describe('renderRaster `into` (a worker writes its band into the shared output)', () => {
  const src = noise(400, 300);
  const plan = planFor(400, 300, 139, 104);
  const w = plan.targetWidth * 3;

  it.each([['SIMD on', true], ['SIMD off', false]])('%s: two bands written into one output make the whole, a band stopped early writes only its rows', (_l, simd) => {
    setSimdEnabled(simd);
    const whole = bytes(renderRaster(src, plan));
    const out = new Uint8Array(plan.targetHeight * w).fill(7);
    const top = renderRaster(src, plan, { rows: [0, 40], into: out.subarray(0, 40 * w) });
    const bottom = renderRaster(src, plan, { rows: [40, plan.targetHeight], into: out.subarray(40 * w) });
    expect(top.data.buffer).toBe(out.buffer);
    expect([top.height, bottom.height]).toEqual([40, plan.targetHeight - 40]);
    expect(Buffer.from(out).equals(whole)).toBe(true);
    // Stopped at row 10 of a band [0, 40): rows 10.. of its part of the output are untouched.
    const part = new Uint8Array(40 * w).fill(7);
    const head = renderRaster(src, plan, { rows: [0, 40], into: part, more: (o) => o < 10 });
    setSimdEnabled(true);
    expect(head.height).toBe(10);
    expect(head.data.length).toBe(10 * w);
    expect(Buffer.from(part.subarray(0, 10 * w)).equals(whole.subarray(0, 10 * w))).toBe(true);
    expect(part.subarray(10 * w).every((v) => v === 7)).toBe(true);
  });

  it('refuses an array of the wrong sample type or too short', () => {
    expect(() => renderRaster(src, plan, { rows: [0, 40], into: new Uint8Array(40 * w - 1) })).toThrow(RangeError);
    expect(() => renderRaster(src, plan, { rows: [0, 40], into: new Uint16Array(40 * w) })).toThrow(/8-bit/);
  });
});
