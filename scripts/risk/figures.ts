/**
 * The sharpness and ringing figures issue 12 holds the visibility work to, for the defaults,
 * the legacy look (encoded light, Lanczos-3, no prefilter) and the reference library's resizes:
 * - a linear-light sinusoidal grating (amplitude 0.4 on 0.5) shrunk 4x, amplitude kept at 0.5x,
 *   0.8x and 0.95x the new Nyquist (targets 98-102 %, >= 85 %, <= 10 %: the last would beat);
 * - a step (0.2 to 0.8 linear) shrunk 4x at 16 sub-pixel phases (edges a quarter source pixel
 *   apart, one output pixel in all), overshoot at the worst phase (Gibbs: 7-8 % for any low-pass
 *   this sharp, CHECKS.md).
 */
import { makePlan, planResponse, renderRaster } from '../../src/core/index.js';
import { lanczos } from '../../src/core/kernels/windowed-sinc.js';
import { adaptiveFilter, analyzeSpectrum } from '../../src/core/risk/index.js';
import type { KernelChoice, PixelRaster, PlanRequest } from '../../src/core/types.js';
import { gratingKept, overshoot, type Output } from '../fidelity/measures.js';
import { grating, stepAt } from '../fidelity/patterns.js';
import { ours, sharpDefault, sharpLinear, type Resizer } from '../fidelity/resizers.js';

const S = 4;
const FRACTIONS = [0.5, 0.8, 0.95];
const PHASES = 16;

/** The defaults as the service resolves them: prefilter=auto from the source's spectrum. */
const served: Resizer = async (src, w, h) => {
  const req: PlanRequest = { sourceWidth: src.width, sourceHeight: src.height, targetWidth: w, targetHeight: h, kernel: 'auto', prefilter: 'auto', light: 'linear' };
  const first = makePlan(req);
  const a = adaptiveFilter(analyzeSpectrum(src), first, (axis, f) => planResponse(first, axis, f));
  return renderRaster(src, a ? makePlan({ ...req, adaptiveSigma: a }) : first).data as Uint8Array;
};

export const resizers: Array<[string, Resizer]> = [
  ['foldwise (defaults, prefilter=auto from the spectrum)', served],
  ['foldwise kernel only (prefilter=none)', ours({ prefilter: 'none' })],
  ['legacy look', ours({ light: 'encoded', kernel: lanczos(3).name as KernelChoice, prefilter: 'none' })],
  ['sharp default', sharpDefault],
  ['sharp linear light', sharpLinear],
];

async function run(r: Resizer, src: PixelRaster, w: number, h: number): Promise<Output> {
  return { data: await r(src, w, h), width: w, height: h, sx: src.width / w, sy: src.height / h };
}

export interface Figures {
  name: string;
  /** Kept amplitude per FRACTIONS entry, 0..1. */
  kept: number[];
  /** Overshoot at each phase, fraction of the step. */
  overshoot: number[];
}

export async function figuresOf(name: string, r: Resizer): Promise<Figures> {
  const kept: number[] = [];
  for (const frac of FRACTIONS) {
    const f = (frac * 0.5) / S;
    // 64 rows: tall enough for the spectrum analysis that prefilter=auto reads.
    kept.push(gratingKept(await run(r, grating(2048, 64, f).raster, 2048 / S, 64 / S), f, 0.4));
  }
  const over: number[] = [];
  for (let k = 0; k < PHASES; k++) {
    const st = stepAt(1024, 16, 512 + (k * S) / PHASES, 0.2, 0.8);
    over.push(overshoot(await run(r, st.raster, 1024 / S, 16 / S), 0.2, 0.8));
  }
  return { name, kept, overshoot: over };
}

/** The table, one row per resizer. */
export async function figuresTable(): Promise<string> {
  const rows: string[] = [
    `Grating (linear light, 0.4 on 0.5) and step (0.2 to 0.8) shrunk ${S}x; targets: kept 98-102 % at 0.5x, >= 85 % at 0.8x, <= 10 % at 0.95x Nyquist; worst-phase overshoot no worse than now (7.8 %), <= 3 % with a ringing limiter.`,
    '| resizer | kept at 0.5x / 0.8x / 0.95x Nyquist (%) | step overshoot % best / worst of 16 phases |',
    '|---|---:|---:|',
  ];
  for (const [name, r] of resizers) {
    const f = await figuresOf(name, r);
    const pct = (v: number) => (100 * v).toFixed(1);
    rows.push(`| ${name} | ${f.kept.map(pct).join(' / ')} | ${pct(Math.min(...f.overshoot))} / ${pct(Math.max(...f.overshoot))} |`);
  }
  return rows.join('\n');
}
