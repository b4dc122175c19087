/**
 * Where one render's resample time goes, in-process on one thread (the worker's share of a
 * streamed rendition), for the pictures and widths of the service benchmark:
 *   npx tsx scripts/bench/resample-stages.ts [--runs 7]
 * Per case: the whole render (renderRaster, SIMD kernels), the same with the ringing limiter
 * off (the difference is the limiter's share), the source rows converted to linear light
 * alone (rasterRows into the kernels' memory, as the render does), and the output rows
 * quantised to sRGB codes alone (rowEncoder); what is left is the two filter passes and their
 * glue (with a pyramid level, the render decodes inside the first reduce, decodeReduce5, so
 * the conversion column is then what a separate conversion would cost). Every figure is also a ratio to sharp's decode-only time of the same JPEG, this run.
 * For the split between the passes' kernels, profile a render (`node --cpu-prof`) with the
 * Wasm module built with names (`npx asc ... --debug`, see scripts/build-simd.ts).
 */
import { parseArgs } from 'node:util';
import { benchJpeg } from './texture.js';
import { decodeRaw } from './decode.js';
import { timeRuns } from './timing.js';
import { pictures } from './service.js';
import { makePlan, renderRaster } from '../../src/core/index.js';
import { rowCodec } from '../../src/core/color/index.js';
import { setRingingLimited } from '../../src/core/resample/limit.js';
import { planTable, streamLayout } from '../../src/core/resample/index.js';
import { rasterRows, rowEncoder, rowScratchBytes, encodeScratchBytes } from '../../src/core/pipeline/raster-rows.js';
import { arenaBytes, arenaFor, simdKernels } from '../../src/core/simd/index.js';
import type { PixelRaster } from '../../src/core/types.js';

const { values: flags } = parseArgs({ options: { runs: { type: 'string', default: '7' } } });
const runs = Math.min(20, Math.max(3, Number(flags.runs)));
const k = simdKernels();
if (!k) throw new Error('this engine has no WebAssembly SIMD: the figures would be the scalar loops');

/** Every source row converted to working floats, as the render's first stage reads them. */
function decodeOnly(src: PixelRaster): void {
  const codec = rowCodec(false, src.channels, true, false);
  const n = src.width * src.channels;
  const arena = arenaFor(k!, arenaBytes([n, Math.ceil(rowScratchBytes(src, codec) / 4) + 40]));
  const line = arena.floats(n);
  const rows = rasterRows(src, codec, { k: k!, arena });
  for (let y = 0; y < src.height; y++) rows.read(y, line, 0);
}

/** Every output row quantised to 8-bit sRGB, as the render's last stage does. */
function encodeOnly(width: number, height: number, channels: 3): void {
  const codec = rowCodec(false, channels, true, false);
  const n = width * channels;
  const arena = arenaFor(k!, arenaBytes([n, Math.ceil(encodeScratchBytes(codec, n) / 4) + 40]));
  const line = arena.floats(n).fill(0.5);
  const out = new Uint8Array(n * height);
  const emit = rowEncoder(codec, out, width, 0, { k: k!, arena });
  for (let o = 0; o < height; o++) emit(o, line);
}

const cases: Array<[string, number]> = [['new-4mp.jpg', 800], ['new-6mp.jpg', 640], ['new-6mp.jpg', 1024], ['new-15mp.jpg', 800], ['new-15mp.jpg', 1024]];
const cell = (ms: number, ref: number) => `${ms.toFixed(1)} ms (${(ms / ref).toFixed(2)}x)`;
console.log(`medians of ${runs} runs; ratios to sharp's decode-only time of the same JPEG\n`);
console.log('| case | plan | sharp decode | render | limiter | sRGB -> linear | linear -> sRGB | filter passes + glue |');
console.log('|---|---|---|---|---|---|---|---|');
for (const [name, width] of cases) {
  const [, w, h, seed] = pictures.find((p) => p[0] === name)!;
  const jpeg = await benchJpeg(w, h, seed);
  const src = await decodeRaw(jpeg);
  const ref = (await timeRuns(runs, () => decodeRaw(jpeg))).wall;
  const th = Math.round((h * width) / w);
  const plan = makePlan({ sourceWidth: w, sourceHeight: h, targetWidth: width, targetHeight: th, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  const tx = planTable(plan, 'x');
  const ty = planTable(plan, 'y');
  const order = streamLayout(tx.srcLen, 3, tx, ty, 0, th, true).hFirst ? 'x first' : 'y first';
  const full = (await timeRuns(runs, () => renderRaster(src, plan))).wall;
  setRingingLimited(false);
  const bare = (await timeRuns(runs, () => renderRaster(src, plan))).wall;
  setRingingLimited(true);
  const decode = (await timeRuns(runs, () => decodeOnly(src))).wall;
  const encode = (await timeRuns(runs, () => encodeOnly(width, th, 3))).wall;
  const rest = bare - decode - encode;
  const planText = `${plan.x.pyramidLevels} level(s), ${tx.taps}x${ty.taps} taps, ${order}`;
  console.log(`| ${name} -> ${width} | ${planText} | ${ref.toFixed(1)} ms | ${cell(full, ref)} | ${cell(full - bare, ref)} | ${cell(decode, ref)} | ${cell(encode, ref)} | ${cell(rest, ref)} |`);
}
