/**
 * Quality per format at equal SSIM, and what each encoder setting costs: bytes and encode time
 * as ratios to the service's JPEG (q82, baseline, fitted Huffman tables, 4:2:0) on the same
 * rendition in the same run. Used to choose the defaults in src/codec/formats.ts and the
 * upload hook's default formats (config ingest.formats).
 *
 *   npx tsx scripts/encode-formats.ts [width] [repeats]
 *
 * Pictures: the demo shop's (generated) and, when Debian's python3-skimage is installed, its
 * public-domain photographs (CHECKS.md, "Open data"). Each is rendered to `width` px by the
 * service's own pipeline (the core's default plan). For each setting the lowest quality whose
 * SSIM (ssim.js, `{ ssim: 'original' }`, Wang et al. 2004) reaches the JPEG's is searched by
 * bisection; at that quality the bytes and the median encode time of `repeats` runs are
 * printed as ratios to the JPEG's. The last table gives the medians over all pictures.
 */
import { existsSync } from 'node:fs';
import sharp from 'sharp';
import { ssim } from 'ssim.js';
import { makePlan, renderRaster } from '../src/core/index.js';
import { demoImages, encodeDemo } from '../tools/demo/index.js';

const width = Number(process.argv[2] ?? 640);
const repeats = Number(process.argv[3] ?? 3);
const skimage = '/usr/lib/python3/dist-packages/skimage/data';
const photos = ['astronaut.png', 'coffee.png', 'chelsea.png', 'rocket.jpg'].filter((f) => existsSync(`${skimage}/${f}`));
const demo = ['fabrics/twill.jpg', 'fabrics/herringbone.jpg', 'shop/brick-front.jpg', 'labels/care-label.png'];

interface Raw { data: Uint8Array; width: number; height: number }
type Encode = (r: Raw, quality: number) => Promise<Buffer>;

const img = (r: Raw) => sharp(r.data, { raw: { width: r.width, height: r.height, channels: 3 } }).withIccProfile('srgb');
const jpeg: Encode = (r, quality) => img(r).jpeg({ quality, progressive: false, optimiseCoding: true, chromaSubsampling: quality >= 90 ? '4:4:4' : '4:2:0' }).toBuffer();
const settings: [string, Encode][] = [
  ['webp effort 2, smart subsample', (r, quality) => img(r).webp({ quality, effort: 2, smartSubsample: true }).toBuffer()],
  ['webp effort 4, smart subsample', (r, quality) => img(r).webp({ quality, effort: 4, smartSubsample: true }).toBuffer()],
  ['webp effort 2, plain 4:2:0', (r, quality) => img(r).webp({ quality, effort: 2 }).toBuffer()],
  ['avif effort 0, 4:4:4', (r, quality) => img(r).avif({ quality, effort: 0 }).toBuffer()],
  ['avif effort 0, 4:2:0', (r, quality) => img(r).avif({ quality, effort: 0, chromaSubsampling: '4:2:0' }).toBuffer()],
  ['avif effort 2, 4:4:4', (r, quality) => img(r).avif({ quality, effort: 2 }).toBuffer()],
];

async function rgba(bytes: Buffer) {
  const { data, info } = await sharp(bytes).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

async function rendition(bytes: Buffer): Promise<Raw> {
  const { data, info } = await sharp(bytes).removeAlpha().toColourspace('srgb').raw().toBuffer({ resolveWithObject: true });
  const height = Math.round((info.height * width) / info.width);
  const plan = makePlan({ sourceWidth: info.width, sourceHeight: info.height, targetWidth: width, targetHeight: height, kernel: 'auto', prefilter: 'auto', light: 'linear' });
  const out = renderRaster({ data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height, channels: 3 }, plan);
  return { data: out.data as Uint8Array, width, height };
}

async function ms(run: () => Promise<Buffer>): Promise<number> {
  const t: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    await run();
    t.push(performance.now() - t0);
  }
  return t.sort((a, b) => a - b)[t.length >> 1];
}

/** Lowest quality whose SSIM reaches `target` (bisection; SSIM rises with quality). */
async function qualityFor(r: Raw, ref: Awaited<ReturnType<typeof rgba>>, encode: Encode, target: number) {
  let lo = 1;
  let hi = 100;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    const s = ssim(ref, await rgba(await encode(r, mid)), { ssim: 'original' }).mssim;
    if (s >= target) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

const summary = new Map<string, { q: number[]; bytes: number[]; time: number[] }>();
const pictures: [string, () => Promise<Buffer>][] = [
  ...demo.map((name): [string, () => Promise<Buffer>] => [name, () => encodeDemo(name, demoImages.find((d) => d.path === name)!.make())]),
  ...photos.map((f): [string, () => Promise<Buffer>] => [`skimage ${f}`, () => sharp(`${skimage}/${f}`).toBuffer()]),
];
if (photos.length === 0) console.log('(python3-skimage not installed: demo pictures only)');
for (const [name, load] of pictures) {
  const r = await rendition(await load());
  const ref = await rgba(await img(r).png().toBuffer());
  const base = await jpeg(r, 82);
  const target = ssim(ref, await rgba(base), { ssim: 'original' }).mssim;
  const baseMs = await ms(() => jpeg(r, 82));
  console.log(`\n${name} at ${r.width}x${r.height}: JPEG q82 ${base.length} bytes, SSIM ${target.toFixed(4)}, ${baseMs.toFixed(1)} ms`);
  console.log('setting                           q at equal SSIM   bytes/jpeg   time/jpeg   (at default q: bytes/jpeg)');
  for (const [label, encode] of settings) {
    const q = await qualityFor(r, ref, encode, target);
    const bytes = (await encode(r, q)).length / base.length;
    const time = (await ms(() => encode(r, q))) / baseMs;
    const dflt = (await encode(r, label.startsWith('webp') ? 80 : 55)).length / base.length;
    console.log(`${label.padEnd(34)}${String(q).padStart(6)}${bytes.toFixed(2).padStart(17)}${time.toFixed(2).padStart(12)}${dflt.toFixed(2).padStart(16)}`);
    const s = summary.get(label) ?? { q: [], bytes: [], time: [] };
    s.q.push(q);
    s.bytes.push(bytes);
    s.time.push(time);
    summary.set(label, s);
  }
}
const mid = (v: number[]) => [...v].sort((a, b) => a - b)[v.length >> 1];
console.log(`\nmedians over ${pictures.length} pictures (equal SSIM to JPEG q82)`);
console.log('setting                           q   bytes/jpeg   time/jpeg');
for (const [label, s] of summary) {
  console.log(`${label.padEnd(34)}${String(mid(s.q)).padStart(3)}${mid(s.bytes).toFixed(2).padStart(13)}${mid(s.time).toFixed(2).padStart(12)}`);
}
