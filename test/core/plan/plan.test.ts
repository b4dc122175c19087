import { describe, expect, it } from 'vitest';
import { makePlan, formatPlanHeader, kernelNames, planResponse } from '../../../src/core/index.js';
import { findKernel } from '../../../src/core/kernels/index.js';
import type { PlanRequest } from '../../../src/core/types.js';

const base: PlanRequest = {
  sourceWidth: 4000, sourceHeight: 3000, targetWidth: 1000, targetHeight: 750,
  kernel: 'auto', prefilter: 'auto', light: 'linear',
};

describe('makePlan', () => {
  it('scales each axis on its own from the crop', () => {
    const p = makePlan({ ...base, crop: { x: 500.5, y: 0, width: 3000, height: 3000 }, targetHeight: 1000 });
    expect(p.x.scale).toBe(3);
    expect(p.y.scale).toBe(3);
    expect(p.crop.x).toBe(500.5);
  });

  it.each([
    ['NaN width', { targetWidth: Number.NaN }],
    ['zero height', { targetHeight: 0 }],
    ['fractional source', { sourceWidth: 10.5 }],
    ['unknown kernel', { kernel: 'sharpest' }],
    ['negative sigma', { prefilter: -1 }],
    ['NaN sigma', { prefilter: Number.NaN }],
    ['crop outside', { crop: { x: 3500, y: 0, width: 1000, height: 3000 } }],
    ['NaN crop', { crop: { x: Number.NaN, y: 0, width: 10, height: 10 } }],
    ['bad light', { light: 'gamma' }],
    ['NaN adaptive sigma', { adaptiveSigma: { x: Number.NaN, y: 0 } }],
  ] as Array<[string, Partial<PlanRequest>]>)('rejects %s with a RangeError', (_label, patch) => {
    expect(() => makePlan({ ...base, ...patch } as PlanRequest)).toThrow(RangeError);
  });

  it('honours kernel and prefilter overrides, on each axis', () => {
    const p = makePlan({ ...base, kernel: 'mitchell-netravali', prefilter: 1.5 });
    expect([p.x.kernel, p.y.kernel, p.x.sigma, p.y.sigma]).toEqual(['mitchell-netravali', 'mitchell-netravali', 1.5, 1.5]);
    const none = makePlan({ ...base, prefilter: 'none', adaptiveSigma: { x: 3, y: 3 } });
    expect([none.x.sigma, none.y.sigma]).toEqual([0, 0]);
  });

  it('upscales with an interpolating kernel and no prefilter (common practice)', () => {
    for (const t of [4100, 6000, 16000]) {
      const p = makePlan({ ...base, targetWidth: t, targetHeight: Math.round(t * 0.75) });
      expect(findKernel(p.x.kernel)!.interpolating).toBe(true);
      expect(p.x.sigma).toBe(0);
      expect(p.reason).toMatch(/upscale/);
    }
  });

  it('raises sigma with the content-adaptive request, combined in quadrature and capped', () => {
    const plain = makePlan(base);
    const raised = makePlan({ ...base, adaptiveSigma: { x: 0.7, y: 0 } });
    // Blurs combine in quadrature (Lowe 2004, CHECKS.md).
    expect(raised.x.sigma).toBeCloseTo(Math.hypot(plain.x.sigma, 0.7), 12);
    expect(raised.y.sigma).toBe(plain.y.sigma);
    expect(raised.reason).toMatch(/content/);
    const capped = makePlan({ ...base, adaptiveSigma: { x: 50, y: 50 } });
    expect(capped.x.sigma).toBeLessThan(50);
    expect(capped.reason).toMatch(/capped/);
    // The raised sigma really lowers the response near the new Nyquist (0.125 cycles/px at 4x).
    expect(planResponse(raised, 'x', 0.1)).toBeLessThan(planResponse(plain, 'x', 0.1));
  });

  it('resamples encoded values only when asked', () => {
    expect(makePlan(base).light).toBe('linear');
    expect(makePlan({ ...base, light: 'encoded' }).reason).toMatch(/encoded/);
  });
});

describe('formatPlanHeader', () => {
  it('states scale, kernel, sigma, pyramid levels and light in our own format', () => {
    const p = makePlan({ ...base, kernel: 'lanczos-3', prefilter: 1.125 });
    expect(formatPlanHeader(p)).toBe(
      'scale=4.000,4.000; kernel=lanczos-3; sigma=1.13,1.13; prefilter=asked; pyramid=0,0; cutoff=1.00,1.00; light=linear',
    );
  });
  it('says where sigma came from: the kernel alone, the content analysis, or nowhere', () => {
    expect(formatPlanHeader(makePlan(base))).toContain('sigma=0.00,0.00; prefilter=kernel;');
    const raised = makePlan({ ...base, adaptiveSigma: { x: 1, y: 0 } });
    expect(formatPlanHeader(raised)).toContain('sigma=1.00,0.00; prefilter=content,kernel;');
    expect(formatPlanHeader(makePlan({ ...base, prefilter: 'none' }))).toContain('prefilter=none;');
  });
  it('names both kernels when the axes differ', () => {
    const p = makePlan({ ...base, targetWidth: 8000, targetHeight: 750 });
    expect(formatPlanHeader(p)).toMatch(/kernel=[a-z0-9-]+,bandlimit;/);
  });
});

describe('kernelNames', () => {
  it('lists the published kernels the API names, and the designed default', () => {
    for (const n of ['lanczos-2', 'lanczos-3', 'catmull-rom', 'mitchell-netravali', 'gaussian', 'triangle', 'box', 'nearest-neighbour', 'bandlimit']) {
      expect(kernelNames).toContain(n);
    }
  });
});

describe('planResponse', () => {
  it('is 1 at DC and follows the Gaussian prefilter exp(-2 pi^2 sigma^2 f^2) (CHECKS.md)', () => {
    const plain = makePlan({ ...base, kernel: 'lanczos-3', prefilter: 'none' });
    const blurred = makePlan({ ...base, kernel: 'lanczos-3', prefilter: 2 });
    expect(planResponse(plain, 'x', 0)).toBeCloseTo(1, 6); // float32 tables
    for (const f of [0.02, 0.05, 0.08]) {
      const g = Math.exp(-2 * Math.PI ** 2 * 4 * f * f);
      expect(planResponse(blurred, 'x', f) / planResponse(plain, 'x', f)).toBeCloseTo(g, 2);
    }
  });
});
