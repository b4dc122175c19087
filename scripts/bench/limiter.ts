/**
 * `npx tsx scripts/bench/limiter.ts`: the ringing limiter's cost. One 12 MP synthetic texture
 * (scripts/bench/texture.ts) rendered to 800, 1600 and 3000 px wide with the limiter on and off,
 * alternating in the same run; prints medians and the on/off ratio.
 */
import { makePlan, renderRaster } from '../../src/core/index.js';
import { setRingingLimited } from '../../src/core/resample/limit.js';
import { setSimdEnabled } from '../../src/core/simd/index.js';
import { benchJpeg } from './texture.js';
import { decodeRaw } from './decode.js';

const RUNS = Number(process.env.BENCH_RUNS ?? 7);
const simd = process.env.BENCH_SIMD !== '0';
setSimdEnabled(simd);
const src = await decodeRaw(await benchJpeg(4000, 3000, 7));
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1];

console.log(`source 4000x3000 RGB, ${simd ? 'SIMD' : 'scalar'}, median of ${RUNS}, alternating`);
console.log('width | off ms | on ms | on/off');
for (const w of [800, 1600, 3000]) {
  const h = Math.round((w * 3) / 4);
  const plan = makePlan({ sourceWidth: 4000, sourceHeight: 3000, targetWidth: w, targetHeight: h, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  const times: Record<'on' | 'off', number[]> = { on: [], off: [] };
  for (let r = -1; r < RUNS; r++) {
    for (const mode of r % 2 ? (['on', 'off'] as const) : (['off', 'on'] as const)) {
      setRingingLimited(mode === 'on');
      const t0 = performance.now();
      renderRaster(src, plan);
      if (r >= 0) times[mode].push(performance.now() - t0);
    }
  }
  setRingingLimited(true);
  const off = median(times.off), on = median(times.on);
  console.log(`${w} | ${off.toFixed(0)} | ${on.toFixed(0)} | ${(on / off).toFixed(2)}`);
}
