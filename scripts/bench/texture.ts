/**
 * A seeded synthetic texture for the benchmark (woven-looking stripes over smooth noise),
 * generated with code and encoded by sharp; nothing is downloaded.
 */
import sharp from 'sharp';

export async function benchJpeg(width: number, height: number, seed: number): Promise<Buffer> {
  let s = seed >>> 0;
  const rnd = () => ((s = (s * 1664525 + 1013904223) >>> 0) / 2 ** 32);
  const waves = Array.from({ length: 12 }, () => ({
    fx: (rnd() - 0.5) * 0.6, fy: (rnd() - 0.5) * 0.6, ph: rnd() * 6.283, a: 20 + rnd() * 30, ch: Math.floor(rnd() * 3),
  }));
  const data = Buffer.alloc(width * height * 3);
  const row = new Float64Array(width * 3);
  for (let y = 0; y < height; y++) {
    row.fill(110);
    for (const w of waves) {
      const base = w.fy * y + w.ph;
      for (let x = 0; x < width; x++) row[x * 3 + w.ch] += w.a * Math.cos(w.fx * x + base);
    }
    for (let i = 0; i < width * 3; i++) data[y * width * 3 + i] = Math.max(0, Math.min(255, row[i] + (rnd() - 0.5) * 24));
  }
  return sharp(data, { raw: { width, height, channels: 3 } }).jpeg({ quality: 90 }).toBuffer();
}
