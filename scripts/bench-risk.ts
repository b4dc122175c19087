/**
 * The alias-risk analysis cost against sharp's decode-only time of the same 12 MP JPEG, both
 * measured in this run (DESIGN.md target: analysis <= 0.3x decode). Prints a table of
 * ratios; asserts nothing. Standalone: `npx tsx scripts/bench-risk.ts`; `npm run bench` also
 * prints it (scripts/bench.ts).
 */
import { fileURLToPath } from 'node:url';
import { makePlan, planResponse, planResponseOf } from '../src/core/index.js';
import { adaptiveFilter, analyzeSpectrum, assessRisk } from '../src/core/risk/index.js';
import { benchJpeg } from './bench/texture.js';
import { decodeRaw } from './bench/decode.js';
import { timeRuns, type Timing } from './bench/timing.js';

const median = timeRuns;

/** The table of the analysis cost as ratios to the decode of one 12 MP JPEG. */
export async function riskBenchTable(runs = Number(process.env.BENCH_RUNS ?? 9)): Promise<string> {
  const jpeg = await benchJpeg(4000, 3000, 42);
  const decode = await median(runs, () => decodeRaw(jpeg));
  const raw = await decodeRaw(jpeg);
  const analysis = await median(runs, () => analyzeSpectrum(raw));
  const spec = analyzeSpectrum(raw);
  const plan = makePlan({ sourceWidth: 4000, sourceHeight: 3000, targetWidth: 800, targetHeight: 600, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  const report = await median(runs, () => assessRisk(spec, plan, (a, f) => planResponse(plan, a, f)));
  // prefilter=auto's decision as a first rendition meets it: a plan of a size not seen before
  // (each call one pixel wider, so no table, design or sampled rows is kept from the last).
  let width = 800;
  const decision = await median(runs, () => {
    width += 1;
    const p = makePlan({ sourceWidth: 4000, sourceHeight: 3000, targetWidth: width, targetHeight: Math.round((3000 * width) / 4000), kernel: 'auto', prefilter: 'auto', light: 'linear' });
    return adaptiveFilter(spec, p, planResponseOf(p));
  });
  const r = (t: Timing) =>
    `${(t.wall / decode.wall).toFixed(3)}x (cpu ${(t.cpu / decode.cpu).toFixed(3)}x, best ${(t.best / decode.best).toFixed(3)}x)`;
  const ms = (t: Timing) => `${t.wall.toFixed(1)} ms (best ${t.best.toFixed(1)})`;
  return [
    `alias-risk analysis, 12 MP JPEG (4000x3000, ${spec.tiles} tiles of ${spec.tileSize} px), median of ${runs} runs`,
    '| step | median wall time | ratio to sharp decode-only: median wall (median cpu, best wall) |',
    '|---|---:|---:|',
    `| sharp decode-only (reference) | ${ms(decode)} | 1.000x |`,
    `| analyzeSpectrum (Welch, linear luminance) | ${ms(analysis)} | ${r(analysis)} |`,
    `| assessRisk for 800 px (model, peaks, grid, sigma) | ${ms(report)} | ${r(report)} |`,
    `| prefilter=auto's decision for a new width near 800 px (sampled response, cut-off search) | ${ms(decision)} | ${r(decision)} |`,
    'target: analyzeSpectrum <= 0.30x',
  ].join('\n');
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  console.log(await riskBenchTable());
}
