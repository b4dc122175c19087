import { describe, expect, it } from 'vitest';
import { makePlan, planResponse } from '../../../src/core/index.js';
import { adaptiveFilter, analyzeSpectrum, assessRisk } from '../../../src/core/risk/index.js';
import type { Plan, PlanRequest } from '../../../src/core/types.js';
import { greyRaster } from './patterns.js';

// Thin light lines 1.5 px wide every 13.2 px on a dark ground (linear 0.03 and 0.83): the
// demo's pinstripe as a formula, each pixel the exact box-filtered coverage. 80 periods.
const W = 1056;
const P = 13.2;
const coverage = (x: number) => {
  const k = Math.floor(x / P);
  let c = 0;
  for (const j of [k - 1, k, k + 1]) c += Math.max(0, Math.min(x + 0.5, j * P + 1.5) - Math.max(x - 0.5, j * P));
  return c;
};
const src = greyRaster(W, 256, (x) => 0.03 + 0.8 * coverage(x), 8);
const spec = analyzeSpectrum(src);

/** The plan the service makes with prefilter=auto (the content cut-off resolved), and its report. */
function planned(width: number, source = spec) {
  const req: PlanRequest = { sourceWidth: W, sourceHeight: 256, targetWidth: width, targetHeight: Math.round((256 * width) / W), kernel: 'auto', prefilter: 'auto', light: 'linear' };
  const first = makePlan(req);
  const respond = (p: Plan) => (axis: 'x' | 'y', f: number) => planResponse(p, axis, f);
  const cut = adaptiveFilter(source, first, respond(first));
  const plan = cut ? makePlan({ ...req, adaptiveSigma: cut }) : first;
  return { plan, report: assessRisk(source, plan, respond(plan)) };
}

describe('the report says what prefilter=auto evened out and from which width it shows cleanly', () => {
  it('names the stripes and their clean width when they cannot be shown (6.25x: 0.47 cycles per output px)', () => {
    const { plan, report } = planned(169);
    expect(plan.x.cutoff).toBeLessThan(0.9);
    // Clean from the width that puts 80 cycles at 0.8x the new Nyquist: 80 / 0.4 = 200 px.
    const m = /the stripes (\d+\.\d) source px apart become an even tone at this width; they show cleanly from (\d+) px wide/.exec(report.reason);
    expect(m).not.toBeNull();
    expect(Number(m![1])).toBeCloseTo(P, 0);
    expect(Number(m![2])).toBeGreaterThanOrEqual(190);
    expect(Number(m![2])).toBeLessThanOrEqual(215);
  });

  it('names a harmonic as the sharpest detail of the stripes, which stay (3.125x)', () => {
    const { plan, report } = planned(338);
    expect(plan.x.cutoff).toBeLessThan(1);
    expect(report.reason).toMatch(/the sharpest detail of the stripes 13\.\d source px apart is evened out at this width \(the stripes stay\)/);
  });

  it('says nothing of evening when nothing comes near the new Nyquist (a sinusoid of 13.2 px at 2x)', () => {
    const { plan, report } = planned(528, analyzeSpectrum(greyRaster(W, 256, (x) => 0.5 + 0.3 * Math.cos((2 * Math.PI * x) / P), 8)));
    expect(plan.x.cutoff ?? 1).toBe(1);
    expect(report.reason).not.toMatch(/even tone|evened out/);
    expect(report.reason).toMatch(/^low/);
  });
});
