/**
 * Measures AVIF and WebP encode time and size per effort level on demo pictures scaled to a
 * typical rendition (1200 px wide), as ratios to a baseline JPEG encode measured in the same
 * run. Used to choose the `effort` values in src/codec/formats.ts.
 *
 *   npx tsx scripts/encode-effort.ts [repeats] [highest AVIF effort]
 *
 * AVIF efforts above 4 take minutes per picture here, so the default stops at 4.
 */
import sharp from 'sharp';
import { demoImages, encodeDemo } from '../tools/demo/index.js';

const repeats = Number(process.argv[2] ?? 3);
const maxAvifEffort = Number(process.argv[3] ?? 4);
const names = ['fabrics/herringbone.jpg', 'shop/brick-front.jpg'];

async function median(run: () => Promise<Buffer>): Promise<{ ms: number; bytes: number }> {
  const times: number[] = [];
  let bytes = 0;
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    bytes = (await run()).length;
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return { ms: times[Math.floor(times.length / 2)], bytes };
}

for (const name of names) {
  const image = demoImages.find((d) => d.path === name)!;
  const source = await encodeDemo(name, image.make());
  const { data, info } = await sharp(source).resize({ width: 1200 }).raw().toBuffer({ resolveWithObject: true });
  const raw = { raw: { width: info.width, height: info.height, channels: info.channels } } as const;
  const base = await median(() => sharp(data, raw).jpeg({ quality: 82, progressive: true }).toBuffer());
  console.log(`\n${name} at ${info.width}x${info.height}; JPEG q82 baseline ${base.ms.toFixed(1)} ms, ${base.bytes} bytes`);
  console.log('format effort  time/jpeg  bytes/jpeg');
  const rows: [string, number, () => Promise<Buffer>][] = [];
  for (let effort = 0; effort <= maxAvifEffort; effort++) {
    rows.push(['avif', effort, () => sharp(data, raw).avif({ quality: 55, effort }).toBuffer()]);
  }
  for (let effort = 0; effort <= 6; effort++) {
    rows.push(['webp', effort, () => sharp(data, raw).webp({ quality: 80, effort, smartSubsample: true }).toBuffer()]);
  }
  for (const [format, effort, run] of rows) {
    const r = await median(run);
    console.log(
      `${format.padEnd(6)} ${String(effort).padStart(6)} ${(r.ms / base.ms).toFixed(2).padStart(10)} ${(r.bytes / base.bytes).toFixed(3).padStart(11)}`,
    );
  }
}
