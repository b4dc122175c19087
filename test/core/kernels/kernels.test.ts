import { describe, expect, it } from 'vitest';
import { findKernel, kernelNames, type Kernel } from '../../../src/core/kernels/index.js';

const k = (name: string): Kernel => findKernel(name)!;

describe('kernel values', () => {
  // Keys (1981), a = -0.5, at x = 0, .25, ..., 2 (CHECKS.md).
  const keys = [1, 111 / 128, 9 / 16, 29 / 128, 0, -9 / 128, -1 / 16, -3 / 128, 0];
  it.each(keys.map((v, i) => [i * 0.25, v]))('catmull-rom(%f) = %f (Keys 1981)', (x, v) => {
    expect(k('catmull-rom').weight(x)).toBeCloseTo(v, 12);
    expect(k('catmull-rom').weight(-x)).toBeCloseTo(v, 12);
  });

  // Mitchell & Netravali (1988), B = C = 1/3 (CHECKS.md).
  const mitchell = [8 / 9, 77 / 144, 1 / 18, -5 / 144, 0];
  it.each(mitchell.map((v, i) => [i * 0.5, v]))('mitchell(%f) = %f (Mitchell-Netravali 1988)', (x, v) => {
    expect(k('mitchell-netravali').weight(x)).toBeCloseTo(v, 12);
  });

  // Lanczos (Duchon 1979): values from CHECKS.md.
  it.each([
    ['lanczos-2', 0.5, (4 * Math.SQRT2) / Math.PI ** 2],
    ['lanczos-2', 1.5, -0.0636844],
    ['lanczos-3', 0.5, 6 / Math.PI ** 2],
    ['lanczos-3', 1.5, -4 / (3 * Math.PI ** 2)],
    ['lanczos-3', 2.5, 0.0243171],
  ] as Array<[string, number, number]>)('%s(%f) = %f (Duchon 1979)', (name, x, v) => {
    expect(k(name).weight(x)).toBeCloseTo(v, 6);
  });
});

describe.each(kernelNames.map((n) => [n]))('kernel %s', (name) => {
  const kernel = k(name);
  it('is even and vanishes outside its support', () => {
    for (let x = 0.013; x < kernel.support + 1; x += 0.037) {
      if (name !== 'nearest-neighbour' && name !== 'box') expect(kernel.weight(-x)).toBeCloseTo(kernel.weight(x), 12);
      if (x >= kernel.support) expect(Math.abs(kernel.weight(x))).toBe(0);
    }
  });
  it('is 1 at 0 and 0 at the other integers when it says it interpolates (CHECKS.md)', () => {
    if (!kernel.interpolating) return expect(kernel.weight(1)).not.toBe(0);
    expect(kernel.weight(0)).toBeCloseTo(1, 12);
    for (let i = 1; i <= 4; i++) {
      expect(kernel.weight(i)).toBeCloseTo(0, 12);
      expect(kernel.weight(-i)).toBeCloseTo(0, 12);
    }
  });
});
