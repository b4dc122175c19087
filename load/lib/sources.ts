import { existsSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';

/** 4000 x 3000 = 12 megapixels, the size the memory and speed targets name. */
export const SOURCE_WIDTH = 4000;
export const SOURCE_HEIGHT = 3000;

/**
 * Woven-fabric-like test sources (the demo's textile shop): fine stripes, checks and a
 * herringbone twill at different pitches and angles, so every one of them would alias when
 * shrunk naively. Written once as JPEG into a temp folder and reused across runs.
 */
export async function makeSources(count: number): Promise<{ dir: string; names: string[] }> {
  const dir = join(tmpdir(), 'foldwise-load-sources');
  mkdirSync(dir, { recursive: true });
  const names: string[] = [];
  for (let i = 0; i < count; i++) {
    const name = `fabric-${String(i).padStart(2, '0')}.jpg`;
    names.push(name);
    const file = join(dir, name);
    if (existsSync(file)) continue;
    await sharp(weave(i), { raw: { width: SOURCE_WIDTH, height: SOURCE_HEIGHT, channels: 3 } })
      .jpeg({ quality: 90 })
      .toFile(file);
  }
  return { dir, names };
}

function weave(i: number): Buffer {
  const w = SOURCE_WIDTH, h = SOURCE_HEIGHT;
  const out = Buffer.alloc(w * h * 3);
  const pitch = 2.2 + (i % 5) * 0.7; // pixels per thread
  const angle = (i * 17 * Math.PI) / 180;
  const ca = Math.cos(angle), sa = Math.sin(angle);
  const kind = i % 3;
  const warp = [40 + i * 13, 60 + i * 7, 120 - i * 5];
  const weft = [230 - i * 3, 210, 160 + i * 6];
  let o = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const u = (x * ca + y * sa) / pitch;
      const v = (-x * sa + y * ca) / pitch;
      let t: number;
      if (kind === 0) t = 0.5 + 0.5 * Math.sin(2 * Math.PI * u); // stripes
      else if (kind === 1) t = (Math.floor(u) + Math.floor(v)) & 1; // checks
      else t = (Math.floor(u + Math.abs(((v % 8) + 8) % 8 - 4)) & 1); // herringbone twill
      for (let c = 0; c < 3; c++) out[o++] = Math.round(warp[c] + (weft[c] - warp[c]) * t);
    }
  }
  return out;
}
