import { describe, expect, it } from 'vitest';
import { renderRaster, kernelNames, srgbToLinear8, makePlan } from '../../../src/core/index.js';
import type { PixelRaster } from '../../../src/core/types.js';
import { setSimdEnabled } from '../../../src/core/simd/index.js';
import { planFor } from './helpers.js';

/** A 32-bit hash of a sample's position (multiply-xorshift): noise without a pattern. */
function hashed(x: number, y: number, c: number): number {
  let s = Math.imul(x + 1, 0x9e3779b1) ^ Math.imul(y + 1, 0x85ebca77) ^ Math.imul(c + 1, 0xc2b2ae3d);
  s = Math.imul(s ^ (s >>> 15), 0x2c1b3c6d);
  return (s ^ (s >>> 13)) >>> 0;
}

function raster(w: number, h: number, channels: 1 | 2 | 3 | 4, deep: boolean, f: (x: number, y: number, c: number) => number): PixelRaster {
  const data = deep ? new Uint16Array(w * h * channels) : new Uint8Array(w * h * channels);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) for (let c = 0; c < channels; c++) data[(y * w + x) * channels + c] = f(x, y, c);
  return { data, width: w, height: h, channels };
}

describe('flat fields stay exactly flat (DC preserved; common practice)', () => {
  const sizes: Array<[number, number]> = [[20, 10], [30, 17], [45, 45], [7, 3], [96, 120]];
  describe.each(kernelNames.map((n) => [n]))('%s', (kernel) => {
    it.each(sizes)('45x45 -> %ix%i, 8-bit RGB linear, 16-bit grey+alpha encoded', (tw, th) => {
      const a = raster(45, 45, 3, false, (_x, _y, c) => [37, 188, 250][c]);
      const out = renderRaster(a, planFor(45, 45, tw, th, { kernel }));
      for (let i = 0; i < out.data.length; i++) if (out.data[i] !== [37, 188, 250][i % 3]) expect(out.data[i]).toBe([37, 188, 250][i % 3]);
      const b = raster(45, 45, 2, true, (_x, _y, c) => (c === 0 ? 40000 : 65535));
      const outB = renderRaster(b, planFor(45, 45, tw, th, { kernel, light: 'encoded' }));
      expect(outB.data).toBeInstanceOf(Uint16Array);
      for (let i = 0; i < outB.data.length; i++) if (outB.data[i] !== (i % 2 ? 65535 : 40000)) expect(outB.data[i]).toBe(-1);
    });
  });
});

describe('no shift: an impulse keeps its centroid (pixel-centre convention x = (o + 1/2) s - 1/2)', () => {
  // Impulse (one pixel, or two for a half-integer p) placed on an output centre or midway
  // between two, so the sampled response is symmetric about it; a half-pixel error in the
  // convention makes it lopsided. The box's half-open edge sits exactly on the midpoint of the
  // fractional case, so that one case skips it.
  const cases: Array<[string, number, number, number]> = [
    ['even 2x', 80, 40, 40.5], ['odd 3x', 81, 27, 40], ['fractional 2.5x', 80, 32, 27], ['4x', 80, 20, 41.5],
    ['upscale 2x', 40, 80, 20],
  ];
  describe.each(kernelNames.filter((n) => n !== 'nearest-neighbour').map((n) => [n]))('%s', (kernel) => {
    it.each(cases)('%s', (label, sw, tw, p) => {
      if (kernel === 'box' && label.startsWith('fractional')) return;
      const s = sw / tw;
      const at = (x: number) => (x === Math.floor(p) || (p % 1 !== 0 && x === Math.ceil(p)) ? 65535 : 0);
      for (const axis of ['x', 'y'] as const) {
        const src = axis === 'x' ? raster(sw, 1, 1, true, (x) => at(x)) : raster(1, sw, 1, true, (_x, y) => at(y));
        const plan = axis === 'x' ? planFor(sw, 1, tw, 1, { kernel, light: 'encoded' }) : planFor(1, sw, 1, tw, { kernel, light: 'encoded' });
        const out = renderRaster(src, plan).data;
        let m0 = 0, m1 = 0;
        out.forEach((v, o) => { m0 += v; m1 += v * ((o + 0.5) * s - 0.5); });
        expect(m1 / m0).toBeCloseTo(p, 3);
      }
    });
  });
});

describe('gamma', () => {
  const stripes = raster(64, 64, 1, false, (x) => (x % 2 ? 255 : 0));
  it.each(kernelNames.filter((n) => n !== 'nearest-neighbour').map((n) => [n]))('1-px stripes halved in linear light give 188 +- 1 with %s (CHECKS.md)', (kernel) => {
    const out = renderRaster(stripes, planFor(64, 64, 32, 32, { kernel }));
    for (let y = 0; y < 32; y++) for (let x = 4; x < 28; x++) expect(Math.abs(out.data[y * 32 + x] - 188)).toBeLessThanOrEqual(1);
  });
  it('light=encoded averages the codes instead: 128 (CHECKS.md: the legacy answer)', () => {
    const out = renderRaster(stripes, planFor(64, 64, 32, 32, { kernel: 'box', light: 'encoded' }));
    expect(out.data[10 * 32 + 10]).toBe(128);
  });
  it('a 50/200 pair averages to 149.94 in linear light, code 150 (CHECKS.md)', () => {
    const pair = raster(2, 1, 1, false, (x) => (x ? 200 : 50));
    const out = renderRaster(pair, planFor(2, 1, 1, 1, { kernel: 'box' }));
    expect(out.data[0]).toBe(150);
    expect((srgbToLinear8[50] + srgbToLinear8[200]) / 2).toBeCloseTo(0.304738, 5);
  });
});

describe('premultiplied alpha', () => {
  // A red square on a transparent background whose hidden colour is green: without
  // premultiplication green or dark fringes appear where alpha is partial (common practice).
  const square = raster(48, 48, 4, false, (x, y, c) => {
    const inside = x >= 12 && x < 36 && y >= 12 && y < 36;
    return inside ? [255, 0, 0, 255][c] : [0, 255, 0, 0][c];
  });
  const targets: Array<[number]> = [[16], [28], [21], [100]];
  describe.each(kernelNames.map((n) => [n]))('%s', (kernel) => {
    it.each(targets)('48 -> %i: colour stays pure red wherever alpha > 0', (t) => {
      const out = renderRaster(square, planFor(48, 48, t, t, { kernel })).data;
      let partial = 0;
      for (let i = 0; i < out.length; i += 4) {
        if (out[i + 3] === 0) { expect([out[i], out[i + 1], out[i + 2]]).toEqual([0, 0, 0]); continue; }
        if (out[i + 3] < 255) partial++;
        if (out[i] !== 255 || out[i + 1] !== 0 || out[i + 2] !== 0) expect(Array.from(out.subarray(i, i + 4))).toEqual([255, 0, 0, out[i + 3]]);
      }
      if (kernel !== 'nearest-neighbour' && kernel !== 'box') expect(partial).toBeGreaterThan(0);
    });
  });
  it('fully transparent stays transparent', () => {
    const clear = raster(30, 30, 4, true, (_x, _y, c) => (c === 3 ? 0 : 50000));
    const out = renderRaster(clear, planFor(30, 30, 11, 13));
    expect(out.data.every((v) => v === 0)).toBe(true);
  });
});

describe('bands and shapes', () => {
  const img = raster(97, 83, 3, false, (x, y, c) => (x * 7 + y * 13 + c * 50) % 256);
  it.each([[40, 30], [200, 150], [97, 41]])('rows [a, b) equal the same rows of the whole render (%i x %i)', (tw, th) => {
    const plan = planFor(97, 83, tw, th);
    const whole = renderRaster(img, plan);
    const cut = Math.floor(th / 3);
    const top = renderRaster(img, plan, { rows: [0, cut] });
    const rest = renderRaster(img, plan, { rows: [cut, th] });
    expect(top.height + rest.height).toBe(th);
    expect(Array.from(top.data)).toEqual(Array.from(whole.data.subarray(0, cut * tw * 3)));
    expect(Array.from(rest.data)).toEqual(Array.from(whole.data.subarray(cut * tw * 3)));
  });
  it('bands agree with the whole render through a pyramid level too (400x300 -> 60x45)', () => {
    const big = raster(400, 300, 3, false, (x, y, c) => (x * 5 + y * 11 + c * 70 + ((x * y) % 7)) % 256);
    const plan = planFor(400, 300, 60, 45);
    expect(plan.y.pyramidLevels).toBe(1);
    const whole = renderRaster(big, plan).data;
    const parts = [[0, 17], [17, 30], [30, 45]].map(([a, b]) => renderRaster(big, plan, { rows: [a, b] }).data);
    expect(Array.from(parts.flatMap((p) => Array.from(p)))).toEqual(Array.from(whole));
  });

  // Each band once chose its own axis order (horizontal or vertical first) by its own rows, and
  // the two orders round differently: these plans moved some 8-bit or 16-bit codes by one.
  describe.each([['SIMD on', true], ['SIMD off', false]])('%s', (_label, simd) => {
    it.each([[146, 128], [98, 146], [89, 80]])('two bands of 200x160 -> %ix%i are the whole render\'s rows, 8-bit RGB and 16-bit grey', (tw, th) => {
      setSimdEnabled(simd);
      try {
        const plan = planFor(200, 160, tw, th);
        for (const [channels, deep] of [[3, false], [1, true]] as const) {
          const src = raster(200, 160, channels, deep, (x, y, c) => hashed(x, y, c) >>> (deep ? 16 : 24));
          const whole = renderRaster(src, plan).data;
          const cut = th >> 1;
          const parts = [renderRaster(src, plan, { rows: [0, cut] }).data, renderRaster(src, plan, { rows: [cut, th] }).data];
          const n = tw * channels;
          expect(Buffer.from(parts[0].buffer).equals(Buffer.from(whole.slice(0, cut * n).buffer))).toBe(true);
          expect(Buffer.from(parts[1].buffer).equals(Buffer.from(whole.slice(cut * n).buffer))).toBe(true);
        }
      } finally {
        setSimdEnabled(true);
      }
    });
  });

  it('rejects a raster that does not match the plan, and bad row bands', () => {
    const plan = planFor(97, 83, 40, 30);
    expect(() => renderRaster({ ...img, width: 96 }, plan)).toThrow(RangeError);
    expect(() => renderRaster(img, plan, { rows: [5, 31] })).toThrow(RangeError);
    expect(() => renderRaster(img, plan, { rows: [Number.NaN, 3] })).toThrow(RangeError);
  });
});

describe('crop, depth and channels', () => {
  it('folds a fractional crop in exactly: a ramp read through the triangle kernel at x + 0.5', () => {
    // Linear interpolation reproduces a linear ramp exactly (common practice), so the output is
    // the ramp at the cropped positions; a crop rounded to whole pixels would be off by 500.
    const ramp = raster(100, 1, 1, true, (x) => 1000 * x);
    const plan = makePlan({ sourceWidth: 100, sourceHeight: 1, crop: { x: 10.5, y: 0, width: 50, height: 1 }, targetWidth: 50, targetHeight: 1, kernel: 'triangle', prefilter: 'none', light: 'encoded' });
    const out = renderRaster(ramp, plan).data;
    for (let o = 0; o < 50; o++) expect(Math.abs(out[o] - 1000 * (10.5 + o))).toBeLessThanOrEqual(1);
  });

  it('keeps 16-bit depth: stripes halved in linear light give linear 0.5 as a 16-bit code (IEC 61966-2-1)', () => {
    const stripes16 = raster(64, 8, 1, true, (x) => (x % 2 ? 65535 : 0));
    const out = renderRaster(stripes16, planFor(64, 8, 32, 4));
    expect(out.data).toBeInstanceOf(Uint16Array);
    // IEC 61966-2-1: 1.055 * 0.5^(1/2.4) - 0.055 = 0.735357 (CHECKS.md: 187.516 / 255), x 65535 = 48191.6.
    expect(Math.abs(out.data[2 * 32 + 16] - 48192)).toBeLessThanOrEqual(1);
  });

  it('grey + alpha: a white square on transparent black keeps its grey wherever alpha > 0', () => {
    const ga = raster(40, 40, 2, false, (x, y, c) => (x >= 10 && x < 30 && y >= 10 && y < 30 ? 255 : c === 0 ? 0 : 0));
    const out = renderRaster(ga, planFor(40, 40, 15, 15)).data;
    for (let i = 0; i < out.length; i += 2) if (out[i + 1] > 0) expect(out[i]).toBe(255);
  });
});
