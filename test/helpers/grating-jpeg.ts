import sharp from 'sharp';

/** Crossed sinusoidal gratings (0.11 and 0.31 cycles/px) and a ramp, 8-bit RGB: analytic content. */
export async function gratingJpeg(width: number, height: number): Promise<Buffer> {
  const raw = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      for (let c = 0; c < 3; c++) {
        const v = 0.5 + 0.3 * Math.sin(2 * Math.PI * (0.11 * x + 0.05 * y + c / 4)) + 0.15 * Math.cos(2 * Math.PI * 0.31 * y) + (0.05 * x) / width;
        raw[(y * width + x) * 3 + c] = Math.round(255 * Math.min(1, Math.max(0, v)));
      }
    }
  }
  return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}
