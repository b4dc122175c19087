/**
 * A drawing surface for the demo pictures: sRGB-encoded floats 0..1, straight alpha,
 * interleaved. Only the demo draws on it; the service never does.
 */
export interface Picture {
  width: number;
  height: number;
  channels: 3 | 4;
  data: Float32Array;
}

export type Rgb = readonly [number, number, number];

export function createPicture(width: number, height: number, channels: 3 | 4, fill: readonly number[]): Picture {
  const data = new Float32Array(width * height * channels);
  for (let i = 0; i < data.length; i += channels) for (let c = 0; c < channels; c++) data[i + c] = fill[c];
  return { width, height, channels, data };
}

/** Paints `rgb` over pixel (x, y) with coverage 0..1 (straight-alpha "over"). */
export function paint(p: Picture, x: number, y: number, rgb: Rgb, coverage: number): void {
  if (x < 0 || y < 0 || x >= p.width || y >= p.height || coverage <= 0) return;
  const a = Math.min(1, coverage);
  const i = (y * p.width + x) * p.channels;
  const d = p.data;
  if (p.channels === 3) {
    for (let c = 0; c < 3; c++) d[i + c] += (rgb[c] - d[i + c]) * a;
    return;
  }
  const below = d[i + 3];
  const out = a + below * (1 - a);
  for (let c = 0; c < 3; c++) d[i + c] = out > 0 ? (rgb[c] * a + d[i + c] * below * (1 - a)) / out : 0;
  d[i + 3] = out;
}

export function fillRect(p: Picture, x0: number, y0: number, x1: number, y1: number, rgb: Rgb, alpha = 1): void {
  for (let y = Math.max(0, y0); y < Math.min(p.height, y1); y++) {
    for (let x = Math.max(0, x0); x < Math.min(p.width, x1); x++) paint(p, x, y, rgb, alpha);
  }
}

/** An antialiased line of the given width (coverage from the distance to the segment). */
export function line(p: Picture, ax: number, ay: number, bx: number, by: number, width: number, rgb: Rgb): void {
  const r = width / 2 + 1;
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy || 1;
  for (let y = Math.floor(Math.min(ay, by) - r); y <= Math.ceil(Math.max(ay, by) + r); y++) {
    for (let x = Math.floor(Math.min(ax, bx) - r); x <= Math.ceil(Math.max(ax, bx) + r); x++) {
      const t = Math.max(0, Math.min(1, ((x + 0.5 - ax) * dx + (y + 0.5 - ay) * dy) / len2));
      const d = Math.hypot(x + 0.5 - ax - t * dx, y + 0.5 - ay - t * dy);
      paint(p, x, y, rgb, Math.max(0, Math.min(1, width / 2 + 0.5 - d)));
    }
  }
}

/** 8-bit samples, rounded to nearest and clamped. */
export function toBytes(p: Picture): Uint8Array {
  const out = new Uint8Array(p.data.length);
  for (let i = 0; i < out.length; i++) out[i] = Math.max(0, Math.min(255, Math.round(p.data[i] * 255)));
  return out;
}

/** sRGB-encoded colour from 8-bit codes. */
export const rgb = (r: number, g: number, b: number): Rgb => [r / 255, g / 255, b / 255];
