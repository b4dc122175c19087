/**
 * `npm run bench`: the rendition pipeline's cost as ratios against the reference library's
 * decode-only time of the same JPEG, all measured in this run (medians).
 */
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import { makePlan, renderRaster } from '../src/core/index.js';
import type { PixelRaster } from '../src/core/types.js';
import { benchJpeg } from './bench/texture.js';
import { decodeRaw } from './bench/decode.js';
import { simdKernels } from '../src/core/simd/index.js';
import { RenderPool } from '../src/pool/render-pool.js';
import { encodeImage } from '../src/codec/encode.js';
import { timeRuns, type Timing } from './bench/timing.js';
import { probeSpooledDecode } from '../src/codec/spool-decode.js';

const RUNS = Number(process.env.BENCH_RUNS ?? 7);
// The through-HTTP section (scripts/bench/service.ts): `npm run bench -- --service-runs 5
// --service-seconds 10`; `--service-only` skips the in-process sections; `--thread-nice N` starts
// the service with pool.threadNice N, `--decoded-bytes N` with cache.decodedBytes N (0: every
// further width decodes its source again), to compare settings.
const { values: flags } = parseArgs({
  options: {
    'service-runs': { type: 'string', default: '5' },
    'service-seconds': { type: 'string', default: '10' },
    'service-only': { type: 'boolean', default: false },
    'thread-nice': { type: 'string' },
    'decoded-bytes': { type: 'string' },
  },
});
const serviceRuns = Math.min(20, Math.max(1, Number(flags['service-runs'])));
const serviceSeconds = Math.min(30, Math.max(1, Number(flags['service-seconds'])));

/** Median wall and process CPU time of RUNS calls after a warm-up (scripts/bench/timing.ts). */
const median = (fn: () => Promise<unknown>): Promise<Timing> => timeRuns(RUNS, fn);

function planOf(src: { width: number; height: number }, w: number, h: number) {
  return makePlan({ sourceWidth: src.width, sourceHeight: src.height, targetWidth: w, targetHeight: h, kernel: 'auto', prefilter: 'auto', light: 'linear' });
}

function ourResample(src: PixelRaster, w: number, h: number): PixelRaster {
  return renderRaster(src, planOf(src, w, h));
}

// The service's own pool (src/pool/render-pool.ts): the same band split, source staging and worker
// entry as a rendition request; its threads start here, and each job's warm-up run reaches both.
const pool = new RenderPool({ threads: 2, maxQueue: 0, retryAfterSeconds: 1, spoolDir: 'auto' });

const encodeJpeg = (out: PixelRaster) =>
  sharp(Buffer.from(out.data.buffer, out.data.byteOffset, out.data.byteLength), { raw: { width: out.width, height: out.height, channels: out.channels } }).jpeg({ quality: 82 }).toBuffer();

/** Decode, resample (in this thread, or in the service's pool) and encode (baseline JPEG, or the service's encoder). */
async function ourPipeline(jpeg: Buffer, w: number, h: number, where: 'in-process' | 'pool', encoder: 'plain' | 'service' = 'plain'): Promise<Buffer> {
  const src = await decodeRaw(jpeg);
  const out = where === 'in-process' ? ourResample(src, w, h) : await pool.resample(src, planOf(src, w, h));
  return encoder === 'plain' ? encodeJpeg(out) : encodeImage(out, { format: 'jpeg', quality: 82, background: { r: 255, g: 255, b: 255 } });
}

/**
 * The service's streamed path (src/rendition/streamed.ts): sharp decodes into a spool file row by
 * row while the pool's workers resample the rows already written; then the same encode.
 */
async function streamedPipeline(jpeg: Buffer, w: number, h: number, encoder: 'plain' | 'service' = 'plain'): Promise<Buffer> {
  const probe = await probeSpooledDecode(jpeg, { maxPixels: 1e9, maxDimension: 1e6 });
  if (!probe || !pool.spool) throw new Error('the benchmark source cannot be spooled here');
  const file = pool.spool.path();
  try {
    const out = await pool.resampleSpooled(file, probe, probe.write(file), planOf(probe, w, h));
    return encoder === 'plain' ? encodeJpeg(out) : encodeImage(out, { format: 'jpeg', quality: 82, background: { r: 255, g: 255, b: 255 } });
  } finally {
    await pool.spool.remove(file);
  }
}

/** sharp alone decoding into a spool file (no resample): the other way sharp can hand over raw pixels. */
async function spoolDecode(jpeg: Buffer): Promise<void> {
  const probe = await probeSpooledDecode(jpeg, { maxPixels: 1e9, maxDimension: 1e6 });
  const file = pool.spool!.path();
  try {
    await probe!.write(file);
  } finally {
    await pool.spool!.remove(file);
  }
}

const jobs: Array<[string, number, number, number, number]> = [
  ['12 MP -> 800 px', 4000, 3000, 800, 600],
  ['4 MP -> 320 px', 2304, 1728, 320, 240],
  ['upscale 400 -> 1200 px', 400, 300, 1200, 900],
];

if (!flags['service-only']) {
  console.log(`median of ${RUNS} runs; ratios are against sharp's decode-only time of the same JPEG;`);
  console.log('wall-time ratio first, CPU-time ratio (all threads of the process) in brackets\n');
  const table: string[][] = [];
  for (const [label, sw, sh, tw, th] of jobs) {
    const jpeg = await benchJpeg(sw, sh, 42);
    const decode = await median(() => decodeRaw(jpeg));
    const raw = await decodeRaw(jpeg);
    const resample = await median(async () => ourResample(raw, tw, th));
    const pipeline = await median(() => ourPipeline(jpeg, tw, th, 'in-process'));
    const pipeline2 = await median(() => ourPipeline(jpeg, tw, th, 'pool'));
    const service = await median(() => ourPipeline(jpeg, tw, th, 'pool', 'service'));
    const streamed = await median(() => streamedPipeline(jpeg, tw, th));
    const streamedService = await median(() => streamedPipeline(jpeg, tw, th, 'service'));
    const spooled = await median(() => spoolDecode(jpeg));
    const sharpDefault = await median(() => sharp(jpeg).resize(tw, th).jpeg({ quality: 82 }).toBuffer());
    const sharpLinear = await median(() => sharp(jpeg).pipelineColourspace('scrgb').resize(tw, th).toColourspace('srgb').jpeg({ quality: 82 }).toBuffer());
    // Wall-time ratio (the target), and in brackets the CPU-time ratio, which a busy machine
    // disturbs less (CPU time adds up every thread, so it does not show the 2-thread speed-up).
    const r = (t: Timing) => `${(t.wall / decode.wall).toFixed(2)}x (cpu ${(t.cpu / decode.cpu).toFixed(2)}x)`;
    table.push([
      label, `${decode.wall.toFixed(1)} ms (cpu ${decode.cpu.toFixed(1)} ms)`, r(streamed),
      `${(streamed.wall / spooled.wall).toFixed(2)}x (decode-only there ${(spooled.wall / decode.wall).toFixed(2)}x)`, r(streamedService),
      r(pipeline), r(pipeline2), r(service), r(resample), r(sharpDefault), r(sharpLinear),
    ]);
  }
  const head = [
    'job', 'sharp decode-only', 'foldwise pipeline, streamed (target)', 'same, vs sharp decode-only into a spool file', 'same, service JPEG encoder',
    'decode then resample, 1 thread', 'decode then resample, pool', 'same, service JPEG encoder', 'ours: resample only, 1 thread',
    'sharp default resize', 'sharp linear-light resize',
  ];
  const widths = head.map((h, i) => Math.max(h.length, ...table.map((t) => t[i].length)));
  const line = (c: string[]) => `| ${c.map((x, i) => x.padEnd(widths[i])).join(' | ')} |`;
  console.log(line(head));
  console.log(`|${widths.map((w) => '-'.repeat(w + 2)).join('|')}|`);
  for (const t of table) console.log(line(t));
  console.log('\nstreamed = what a rendition request runs (src/rendition/streamed.ts): sharp decodes into a spool file row by row while the');
  console.log('  service pool (src/pool/render-pool.ts, 2 worker threads) resamples the rows already there, then sharp encodes a baseline JPEG (quality 82);');
  console.log('  target: 12 MP -> 800 px streamed <= 1.30x; next column: the same run divided by sharp decoding into the spool file alone');
  console.log('decode then resample = sharp decode to raw in memory, then our resample (in this thread, or staged in shared memory for the pool), then the encode;');
  console.log('  the path for sources with alpha and for the first rendition of a source whose spectrum prefilter=auto needs');
  console.log('service JPEG encoder = src/codec/encode.ts (baseline, Huffman tables fitted to the picture, sRGB profile attached), what a rendition request returns');
  const simd = simdKernels();
  console.log(simd
    ? `working memory of the resample (SIMD arena, largest job): ${(simd.memory.buffer.byteLength / 2 ** 20).toFixed(1)} MiB against ${(4000 * 3000 * 3 / 2 ** 20).toFixed(1)} MiB of decoded 12 MP pixels`
    : 'SIMD kernels unavailable: scalar loops measured');
  await pool.close();

  // The alias-risk analysis of the same kind of source, as a ratio to the same decode (scripts/bench-risk.ts).
  const { riskBenchTable } = await import('./bench-risk.js');
  console.log(`\n${await riskBenchTable(RUNS)}`);
} else {
  await pool.close();
}

const { serviceBenchTable } = await import('./bench/service.js');
const settings = {
  ...(flags['thread-nice'] === undefined ? {} : { pool: { threadNice: Number(flags['thread-nice']) } }),
  ...(flags['decoded-bytes'] === undefined ? {} : { cache: { decodedBytes: Number(flags['decoded-bytes']) } }),
};
console.log(`\n${await serviceBenchTable(serviceRuns, serviceSeconds, settings)}`);
