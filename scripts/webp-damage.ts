/**
 * How many damaged lossy WebPs are refused by libwebp alone (sharp, failOn 'warning') and by
 * our decode (src/codec/webp's bitstream check, then libwebp), per kind of damage, on analytic
 * pictures and a demo picture at two qualities. Prints one table; any damaged file our decode
 * still accepts is written as a PNG to the temp folder, to be looked at.
 *
 *   npx tsx scripts/webp-damage.ts [width=800]
 */
import { writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { decodeImage } from '../src/codec/decode.js';
import { checkWebp } from '../src/codec/webp/check.js';
import { gratingRaw, weaveRaw } from '../test/helpers/damage.js';
import { demoImages, encodeDemo } from '../tools/demo/index.js';

const width = Number(process.argv[2] ?? 800);
const height = Math.round((width * 3) / 4);
const limits = { maxPixels: 100_000_000, maxDimension: 16_383 };

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32;
}

type Damage = (good: Buffer, k: number, rnd: () => number) => Buffer;
const past = (b: Buffer, rnd: () => number) => 40 + Math.floor(rnd() * (b.length - 40));
const kinds: Array<[string, number, Damage]> = [
  ['every 64th byte of the middle third inverted (16 start offsets)', 16, (g, k) => {
    const b = Buffer.from(g);
    for (let i = Math.floor(b.length / 3) + k; i < Math.floor((2 * b.length) / 3); i += 64) b[i] ^= 0xff;
    return b;
  }],
  ['one byte inverted', 25, (g, _k, rnd) => { const b = Buffer.from(g); b[past(b, rnd)] ^= 0xff; return b; }],
  ['one bit flipped', 25, (g, _k, rnd) => { const b = Buffer.from(g); b[past(b, rnd)] ^= 1 << Math.floor(rnd() * 8); return b; }],
  ['four bytes overwritten', 25, (g, _k, rnd) => { const b = Buffer.from(g); for (let i = 0; i < 4; i++) b[past(b, rnd)] = Math.floor(rnd() * 256); return b; }],
  ['cut at a random length', 10, (g, _k, rnd) => Buffer.from(g.subarray(0, past(g, rnd)))],
];

const herringbone = demoImages.find((d) => d.path === 'fabrics/herringbone.jpg')!;
const demo = await sharp(await encodeDemo(herringbone.path, herringbone.make())).resize(width, height).removeAlpha().raw().toBuffer();
const pictures: Array<[string, Buffer]> = [['weave', weaveRaw(width, height)], ['grating', gratingRaw(width, height)], ['herringbone (demo)', demo]];

const rows = new Map<string, { n: number; libwebp: number; ours: number; served: number }>();
const survivors: string[] = [];
let checkMs = 0;
let decodeMs = 0;
for (const [picture, raw] of pictures) {
  for (const quality of [50, 90]) {
    const good = await sharp(raw, { raw: { width, height, channels: 3 } }).webp({ quality }).toBuffer();
    let t = performance.now();
    await checkWebp(good);
    checkMs += performance.now() - t;
    t = performance.now();
    await sharp(good).raw().toBuffer();
    decodeMs += performance.now() - t;
    for (const [kind, count, damage] of kinds) {
      const rnd = lcg(quality * 7919 + picture.length);
      const row = rows.get(kind) ?? { n: 0, libwebp: 0, ours: 0, served: 0 };
      for (let k = 0; k < count; k++) {
        const bytes = damage(good, k, rnd);
        row.n++;
        if (!(await sharp(bytes, { failOn: 'warning' }).raw().toBuffer().then(() => true, () => false))) row.libwebp++;
        const decoded = await decodeImage(bytes, limits).catch(() => null);
        if (!decoded) {
          row.ours++;
          continue;
        }
        row.served++;
        const file = join(tmpdir(), `webp-survivor-${survivors.length}.png`);
        const r = decoded.raster;
        writeFileSync(file, await sharp(Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength), { raw: { width: r.width, height: r.height, channels: r.channels } }).png().toBuffer());
        survivors.push(`${picture} q${quality}, ${kind} #${k}: ${file}`);
      }
      rows.set(kind, row);
    }
  }
}

console.log(`\ndamaged lossy WebPs, ${width}x${height}, pictures: ${pictures.map(([p]) => p).join(', ')}; qualities 50 and 90`);
console.log('damage'.padEnd(66), 'files', 'refused by libwebp', 'refused by our decode', 'served');
for (const [kind, r] of rows) {
  console.log(kind.padEnd(66), String(r.n).padStart(5), `${r.libwebp} (${((100 * r.libwebp) / r.n).toFixed(0)} %)`.padStart(18), `${r.ours} (${((100 * r.ours) / r.n).toFixed(0)} %)`.padStart(21), String(r.served).padStart(6));
}
console.log(`bitstream check time / libwebp decode time on the undamaged files: ${(checkMs / decodeMs).toFixed(2)}`);
for (const s of survivors) console.log(`served: ${s}`);
