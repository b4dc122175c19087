import { createPicture, line, paint, rgb, type Picture, type Rgb } from './picture.js';
import { mulberry32 } from './prng.js';
import { liftPlans } from './weave.js';

const size = 1800;

/** Tartan sett: colour and width in pixels, mirrored as a sett is (common practice). */
const sett: readonly [Rgb, number][] = [
  [rgb(30, 84, 58), 42],
  [rgb(24, 32, 70), 26],
  [rgb(178, 36, 40), 7],
  [rgb(24, 32, 70), 26],
  [rgb(30, 84, 58), 42],
  [rgb(222, 190, 80), 4],
];
const settLength = sett.reduce((n, [, w]) => n + w, 0);

function band(pos: number): Rgb {
  const period = 2 * settLength;
  let q = ((pos % period) + period) % period;
  if (q >= settLength) q = period - 1 - q; // mirrored repeat
  for (const [c, w] of sett) {
    if (q < w) return c;
    q -= w;
  }
  return sett[0][0];
}

interface Layer {
  ox: number;
  oy: number;
  ux: number;
  uy: number;
  vx: number;
  vy: number;
}

/**
 * A tartan scarf folded in three on a transparent background: each layer a twill-woven
 * parallelogram with antialiased edges, a soft translucent shadow under it, and a fringe of
 * one-pixel threads at its end. The straight-alpha edges and the fringe are what shows dark
 * or light halos when a resizer forgets to premultiply.
 */
export function foldedScarf(): Picture {
  const p = createPicture(size, size, 4, [0, 0, 0, 0]);
  const rand = mulberry32(0x5ca7);
  const layers: Layer[] = [0, 1, 2].map((k) => ({
    ox: 330 + 50 * k,
    oy: 360 + 300 * k,
    ux: 1120,
    uy: 90,
    vx: 70,
    vy: 470,
  }));
  for (const l of layers) drawLayer(p, l, rand);
  return p;
}

function drawLayer(p: Picture, l: Layer, rand: () => number): void {
  const det = l.ux * l.vy - l.uy * l.vx;
  const lenU = Math.hypot(l.ux, l.uy);
  const lenV = Math.hypot(l.vx, l.vy);
  const hs = Math.abs(det) / lenV; // distance between the s = 0 and s = 1 edges
  const ht = Math.abs(det) / lenU;
  const local = (x: number, y: number) => {
    const dx = x - l.ox;
    const dy = y - l.oy;
    return { s: (dx * l.vy - dy * l.vx) / det, t: (l.ux * dy - l.uy * dx) / det };
  };
  const inside = (s: number, t: number) => Math.min(s * hs, (1 - s) * hs, t * ht, (1 - t) * ht);
  const x0 = Math.floor(Math.min(l.ox, l.ox + l.vx)) - 40;
  const x1 = Math.ceil(Math.max(l.ox + l.ux, l.ox + l.ux + l.vx)) + 40;
  const y0 = Math.floor(Math.min(l.oy, l.oy + l.uy)) - 40;
  const y1 = Math.ceil(l.oy + l.uy + l.vy) + 40;
  const black: Rgb = [0, 0, 0];
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      // Soft shadow: the layer offset by (16, 22), fading over 40 px.
      const sh = local(x + 0.5 - 16, y + 0.5 - 22);
      paint(p, x, y, black, 0.3 * Math.max(0, Math.min(1, (inside(sh.s, sh.t) + 20) / 40)));
    }
  }
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const { s, t } = local(x + 0.5, y + 0.5);
      const coverage = Math.max(0, Math.min(1, inside(s, t) + 0.5));
      if (coverage === 0) continue;
      const a = s * lenU;
      const b = t * lenV;
      const up = liftPlans.twill22(Math.floor(a / 2.4), Math.floor(b / 2.4));
      const c = up ? band(a) : band(b);
      const shade = (0.72 + 0.28 * Math.sqrt(Math.sin(Math.PI * Math.min(1, Math.max(0, t))))) * (0.96 + 0.08 * rand());
      paint(p, x, y, [c[0] * shade, c[1] * shade, c[2] * shade], coverage);
    }
  }
  // Fringe: a thread every 5 px across the end, 50..90 px long, hanging out past s = 0.
  const ex = -l.ux / lenU;
  const ey = -l.uy / lenU;
  for (let b = 3; b < lenV - 3; b += 5) {
    const sx = l.ox + (l.vx * b) / lenV;
    const sy = l.oy + (l.vy * b) / lenV;
    const len = 50 + 40 * rand();
    const sway = (rand() - 0.5) * 14;
    line(p, sx, sy, sx + ex * len - ey * sway, sy + ey * len + ex * sway, 1.2, band(b));
  }
}
