/**
 * `npm run risk-sheets [-- outDir]`: contact sheets for looking at the demo renditions. For each
 * demo picture, at 160..1280 px, the legacy look (encoded light, Lanczos-3, no prefilter) beside
 * the default, cropped where the two differ most, at 1:1 and enlarged 3x (nearest neighbour),
 * each row labelled with the width and both risk levels. Writes PNGs (default /tmp/foldwise-sheets)
 * and prints the levels and advice, so what the report says can be checked against what shows.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import type { PixelRaster } from '../../src/core/types.js';
import { assess, demoPaths, demoSource, planFor, render, type Look } from './cases.js';

const WIDTHS = [160, 320, 480, 640, 960, 1280];
const LOOKS: Look[] = ['legacy', 'default'];
const out = process.argv[2] ?? '/tmp/foldwise-sheets';

/** Grey luminance of a raster (alpha composited on white), 0..255. */
function grey(r: PixelRaster): Float64Array {
  const g = new Float64Array(r.width * r.height);
  const c = r.channels;
  for (let i = 0; i < g.length; i++) {
    const a = c === 2 || c === 4 ? r.data[i * c + c - 1] / 255 : 1;
    const y = c >= 3 ? 0.2126 * r.data[i * c] + 0.7152 * r.data[i * c + 1] + 0.0722 * r.data[i * c + 2] : r.data[i * c];
    g[i] = y * a + 255 * (1 - a);
  }
  return g;
}

/** Top-left corner of the w x h window where the two renditions differ most (sum of |a - b|). */
function mostDifferent(a: PixelRaster, b: PixelRaster, w: number, h: number): { x: number; y: number } {
  const ga = grey(a);
  const gb = grey(b);
  let best = { x: 0, y: 0, d: -1 };
  const step = Math.max(4, Math.round(Math.min(w, h) / 4));
  for (let y = 0; y + h <= a.height; y += step) {
    for (let x = 0; x + w <= a.width; x += step) {
      let d = 0;
      for (let j = y; j < y + h; j += 2) for (let i = x; i < x + w; i += 2) d += Math.abs(ga[j * a.width + i] - gb[j * a.width + i]);
      if (d > best.d) best = { x, y, d };
    }
  }
  return best;
}

async function crop(r: PixelRaster, x: number, y: number, w: number, h: number, k: number): Promise<Buffer> {
  const buf = Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength);
  return sharp(buf, { raw: { width: r.width, height: r.height, channels: r.channels as 1 | 2 | 3 | 4 } })
    .extract({ left: x, top: y, width: w, height: h })
    .flatten({ background: '#ffffff' })
    .resize(w * k, h * k, { kernel: 'nearest' })
    .png()
    .toBuffer();
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;');
const label = (text: string, width: number) =>
  Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="18"><rect width="100%" height="100%" fill="#fff"/><text x="2" y="13" font-family="sans-serif" font-size="12" fill="#111">${esc(text)}</text></svg>`);

mkdirSync(out, { recursive: true });
for (const path of demoPaths()) {
  const src = demoSource(path);
  const name = path.split('/').pop()!.replace(/\.\w+$/, '');
  for (const k of [1, 3]) {
    const cw = k === 1 ? 300 : 110;
    const ch = k === 1 ? 200 : 75;
    const parts: { input: Buffer; left: number; top: number }[] = [];
    let top = 0;
    const sheetWidth = 2 * cw * k + 12;
    for (const width of WIDTHS) {
      const r = LOOKS.map((look) => {
        const plan = planFor(src, width, look);
        return { look, plan, raster: render(src, plan), report: assess(src, plan) };
      });
      const w = Math.min(cw, r[0].raster.width);
      const h = Math.min(ch, r[0].raster.height);
      const at = mostDifferent(r[0].raster, r[1].raster, w, h);
      const words = r.map((x) => `${x.look} ${x.report.level} ${x.report.margin.toFixed(2)}`).join(' | ');
      parts.push({ input: label(`${width} px, crop at ${at.x},${at.y}: ${words}`, sheetWidth), left: 0, top });
      top += 18;
      for (let i = 0; i < 2; i++) parts.push({ input: await crop(r[i].raster, at.x, at.y, w, h, k), left: i * (cw * k + 12), top });
      top += h * k + 8;
      if (k === 1) {
        const d = r[1].report;
        const pat = d.patterns.find((p) => p.kind !== 'clean');
        console.log(`${name} ${width}: ${words}; default cutoff ${d.cutoff.x.toFixed(2)}/${d.cutoff.y.toFixed(2)}; ${pat?.description ?? '-'}; advice: ${d.advice.map((a) => `${a.change} (${a.cost})`).join('; ') || '-'}`);
      }
    }
    const file = join(out, `${name}-${k}x.png`);
    await sharp({ create: { width: sheetWidth, height: top, channels: 3, background: '#808080' } }).composite(parts).png().toFile(file);
    console.log(`wrote ${file}`);
  }
}
