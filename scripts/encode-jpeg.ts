/**
 * The JPEG encoder's share of a rendition: time against bytes at equal SSIM for the settings
 * sharp exposes, on the demo pictures scaled to an 800 px rendition. Used to choose the JPEG
 * settings in src/codec/encode.ts.
 *
 *   npx tsx scripts/encode-jpeg.ts [repeats]
 *
 * For each quantisation variant (chroma subsampling x libjpeg tables or trellis quantisation)
 * the quality is searched for the lowest one whose SSIM reaches that of the service's
 * setting before this measurement (q82, 4:2:0, libjpeg tables); SSIM is ssim.js with
 * `{ ssim: 'original' }` (Wang et al. 2004, CHECKS.md). At that quality each entropy-coding
 * variant (baseline or progressive, Huffman tables optimised or not) is timed: the decoded
 * pixels are the same, so only time and bytes move. Each encode starts from the raw rendition
 * and attaches the sRGB profile, as the service does; time ratios are medians over `repeats`
 * pairs of (variant, reference) encoded alternately in this run.
 */
import sharp, { type JpegOptions } from 'sharp';
import { ssim } from 'ssim.js';
import { demoImages, encodeDemo } from '../tools/demo/index.js';

const repeats = Number(process.argv[2] ?? 5);
const names = ['fabrics/twill.jpg', 'fabrics/herringbone.jpg', 'shop/brick-front.jpg', 'labels/care-label.png'];
const reference: JpegOptions = { quality: 82, chromaSubsampling: '4:2:0', progressive: true };

interface Raw { data: Buffer; width: number; height: number }

const quantisers: [string, JpegOptions][] = [
  ['4:2:0, libjpeg tables', { chromaSubsampling: '4:2:0' }],
  ['4:4:4, libjpeg tables', { chromaSubsampling: '4:4:4' }],
  ['4:2:0, trellis', { chromaSubsampling: '4:2:0', trellisQuantisation: true }],
  ['4:2:0, trellis + deringing + table 3', { chromaSubsampling: '4:2:0', trellisQuantisation: true, overshootDeringing: true, quantisationTable: 3 }],
  ['4:4:4, trellis', { chromaSubsampling: '4:4:4', trellisQuantisation: true }],
];
const coders: [string, JpegOptions][] = [
  ['baseline, standard Huffman', { progressive: false, optimiseCoding: false }],
  ['baseline, optimised Huffman', { progressive: false, optimiseCoding: true }],
  ['progressive', { progressive: true }],
  ['progressive, optimised scans', { progressive: true, optimiseScans: true }],
];

const encode = (raw: Raw, o: JpegOptions) =>
  sharp(raw.data, { raw: { width: raw.width, height: raw.height, channels: 3 } }).withIccProfile('srgb').jpeg(o).toBuffer();

async function rgba(img: Buffer | Raw) {
  const s = Buffer.isBuffer(img) ? sharp(img) : sharp(img.data, { raw: { width: img.width, height: img.height, channels: 3 } });
  const { data, info } = await s.ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

/**
 * Time and bytes of `run` against the reference encode `ref`, run alternately in pairs after a
 * warm-up of both, so a busy machine disturbs both sides alike: the median of the per-pair
 * wall-time ratios, and of the per-pair CPU-time ratios (all libvips threads; steadier).
 */
async function versus(run: () => Promise<Buffer>, ref: () => Promise<Buffer>): Promise<{ wall: number; cpu: number; bytes: number }> {
  const bytes = (await run()).length;
  await ref();
  const walls: number[] = [];
  const cpus: number[] = [];
  const once = async (f: () => Promise<Buffer>) => {
    const c = process.cpuUsage();
    const t = performance.now();
    await f();
    const used = process.cpuUsage(c);
    return { wall: performance.now() - t, cpu: used.user + used.system };
  };
  for (let i = 0; i < repeats; i++) {
    const a = await once(run);
    const b = await once(ref);
    walls.push(a.wall / b.wall);
    cpus.push(a.cpu / Math.max(1, b.cpu));
  }
  const mid = (v: number[]) => v.sort((x, y) => x - y)[v.length >> 1];
  return { wall: mid(walls), cpu: mid(cpus), bytes };
}

console.log(`ratios against q82 progressive 4:2:0 libjpeg tables (the setting before this measurement), encoded alternately with each`);
console.log(`variant; medians of ${repeats} pairs, wall time and (in brackets) CPU time of all threads`);
for (const name of names) {
  const image = demoImages.find((d) => d.path === name)!;
  const source = await encodeDemo(name, image.make());
  const { data, info } = await sharp(source).flatten({ background: '#ffffff' }).resize({ width: 800 }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const raw: Raw = { data, width: info.width, height: info.height };
  const original = await rgba(raw);
  const score = async (jpeg: Buffer) => ssim(original, await rgba(jpeg), { ssim: 'original' }).mssim;
  const ref = () => encode(raw, reference);
  const refBytes = (await ref()).length;
  const target = await score(await ref());
  console.log(`\n${name} at ${raw.width}x${raw.height}: reference ${refBytes} bytes, SSIM ${target.toFixed(4)}`);
  console.log('| quantisation | quality at equal SSIM | entropy coding | time/ref (cpu) | bytes/ref |');
  console.log('|---|---|---|---|---|');
  for (const [qLabel, q] of quantisers) {
    // Lowest quality reaching the target SSIM (SSIM rises with quality; bisection on integers).
    let lo = 30;
    let hi = 100;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((await score(await encode(raw, { ...q, quality: mid, progressive: false }))) >= target) hi = mid;
      else lo = mid + 1;
    }
    for (const [cLabel, c] of coders) {
      const r = await versus(() => encode(raw, { ...q, ...c, quality: lo }), ref);
      console.log(`| ${qLabel} | ${lo} | ${cLabel} | ${r.wall.toFixed(2)} (${r.cpu.toFixed(2)}) | ${(r.bytes / refBytes).toFixed(3)} |`);
    }
  }
  for (const smartSubsample of [false, true]) {
    const r = await versus(() => sharp(raw.data, { raw: { width: raw.width, height: raw.height, channels: 3 } }).withIccProfile('srgb').webp({ quality: 80, effort: 4, smartSubsample }).toBuffer(), ref);
    const s = await score(await sharp(raw.data, { raw: { width: raw.width, height: raw.height, channels: 3 } }).webp({ quality: 80, effort: 4, smartSubsample }).toBuffer());
    console.log(`| (WebP q80 effort 4, smartSubsample ${smartSubsample ? 'on' : 'off'}; SSIM ${s.toFixed(4)}) | | | ${r.wall.toFixed(2)} (${r.cpu.toFixed(2)}) | ${(r.bytes / refBytes).toFixed(3)} |`);
  }
}
