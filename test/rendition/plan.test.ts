/**
 * The one planRendition (src/rendition/plan.ts): layout, plan and, for prefilter=auto on a
 * shrinking plan, the adaptive filter from the source's spectrum and the plan again. A grating
 * at 141 cycles per 512 px (0.275 cycles/px) lies just past the new Nyquist frequency of a
 * 2x reduction (0.25; sampling theorem, Shannon 1949), so the visibility model narrows the cut-off.
 */
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config.js';
import { analyzeSpectrum } from '../../src/core/risk/index.js';
import { planRendition } from '../../src/rendition/plan.js';
import { compileRenditionQuery } from '../../src/schemas/rendition.js';
import { kernelNames } from '../../src/core/index.js';
import { greyRaster } from '../core/risk/patterns.js';

const N = 512;
const limits = loadConfig({}).limits;
const query = compileRenditionQuery({ maxDimension: limits.maxDimension, kernelNames });
const spectrum = analyzeSpectrum(greyRaster(N, N, (x) => 0.5 + 0.4 * Math.cos((2 * Math.PI * 141 * x) / N), 8));
const source = { width: N, height: N };

describe('planRendition', () => {
  it('plans again with the adaptive filter when the spectrum shows a pattern that would fold', () => {
    const plain = planRendition(source, query.parse({ width: '256', prefilter: 'none' }), limits);
    const planned = planRendition(source, query.parse({ width: '256' }), limits, () => spectrum);
    expect(planned.adaptive?.cutoff?.x).toBeLessThan(1);
    expect(planned.plan.x.scale).toBe(2);
    expect([planned.layout.targetWidth, planned.layout.targetHeight]).toEqual([256, 256]);
    expect(planned.plan.x.cutoff).toBe(planned.adaptive?.cutoff?.x);
    expect(planned.plan.x.sigmaFrom).toBe('content');
    expect(planRendition(source, query.parse({ width: '256' }), limits).plan.x.cutoff ?? 1).toBe(1);
    expect(plain.adaptive).toBeUndefined();
  });

  it('asks for the spectrum only for prefilter=auto on a plan that shrinks an axis', () => {
    let asked = 0;
    const spectrumOf = () => (asked++, spectrum);
    planRendition(source, query.parse({ width: '256', prefilter: 'none' }), limits, spectrumOf);
    planRendition(source, query.parse({ width: '256', prefilter: '1.5' }), limits, spectrumOf);
    planRendition(source, query.parse({ width: '1024' }), limits, spectrumOf);
    expect(asked).toBe(0);
    planRendition(source, query.parse({ width: '256' }), limits, spectrumOf);
    expect(asked).toBe(1);
  });

  it('is null when the spectrum is wanted and not at hand (the streamed path then decodes first)', () => {
    expect(planRendition(source, query.parse({ width: '256' }), limits, () => undefined)).toBeNull();
    expect(planRendition(source, query.parse({ width: '1024', enlarge: 'allowed' }), limits, () => undefined)?.plan.x.scale).toBe(0.5);
  });

  it('refuses a canvas past the output limit', () => {
    const q = query.parse({ width: String(limits.maxDimension), height: String(limits.maxDimension), fit: 'contain' });
    expect(() => planRendition(source, q, { ...limits, maxOutputPixels: 1000 })).toThrow(expect.objectContaining({ code: 'ERR_OUTPUT_TOO_LARGE' }));
  });
});
