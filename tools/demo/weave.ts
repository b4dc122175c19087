import { createPicture, type Picture, type Rgb } from './picture.js';
import { mulberry32, randomTable } from './prng.js';

/** How one woven cloth is made: thread pitch, colours per thread, and the weave's lift plan. */
export interface Cloth {
  width: number;
  height: number;
  /** Thread spacing in pixels; fractional on purpose, so the pattern drifts across pixels. */
  pitch: number;
  seed: number;
  /** Colour of warp thread i (vertical threads). */
  warp(i: number, jitter: number): Rgb;
  /** Colour of weft thread j (horizontal threads). */
  weft(j: number, jitter: number): Rgb;
  /** True where warp thread i passes over weft thread j. */
  warpUp(i: number, j: number): boolean;
  /** Per-pixel fibre noise, 0..1 of full scale (0 keeps PNGs small). */
  fibre: number;
}

const threads = 4096;

/**
 * Renders a cloth: each cell shows the thread on top, shaded across its round cross-section
 * (0.55 + 0.45 sin(pi t)), with per-thread colour jitter and slubs (slow thickness changes
 * along a thread), plus optional fibre noise.
 */
export function weave(cloth: Cloth): Picture {
  const rand = mulberry32(cloth.seed);
  const warpJitter = randomTable(rand, threads);
  const weftJitter = randomTable(rand, threads);
  const slubPhase = randomTable(rand, threads);
  const warpColours = Array.from({ length: threads }, (_, i) => cloth.warp(i, warpJitter[i]));
  const weftColours = Array.from({ length: threads }, (_, j) => cloth.weft(j, weftJitter[j]));
  // Tables instead of two sines per pixel: the cross-section profile by 1/256 of a thread,
  // and the slub sin(along + phase) split by the angle-addition formula.
  const profile = Float32Array.from({ length: 257 }, (_, k) => 0.55 + 0.45 * Math.sin((Math.PI * k) / 256));
  const phaseSin = slubPhase.map((t) => Math.sin(t * 6.283));
  const phaseCos = slubPhase.map((t) => Math.cos(t * 6.283));
  const alongSin = (n: number) => Float32Array.from({ length: n }, (_, k) => Math.sin((k / cloth.pitch) * 0.37));
  const alongCos = (n: number) => Float32Array.from({ length: n }, (_, k) => Math.cos((k / cloth.pitch) * 0.37));
  const [rowSin, rowCos, colSin, colCos] = [alongSin(cloth.height), alongCos(cloth.height), alongSin(cloth.width), alongCos(cloth.width)];
  const p = createPicture(cloth.width, cloth.height, 3, [0, 0, 0]);
  const d = p.data;
  for (let y = 0, o = 0; y < cloth.height; y++) {
    const v = y / cloth.pitch;
    const j = Math.floor(v);
    const fy = v - j;
    for (let x = 0; x < cloth.width; x++, o += 3) {
      const u = x / cloth.pitch;
      const i = Math.floor(u);
      const fx = u - i;
      const up = cloth.warpUp(i, j);
      const across = up ? fx : fy;
      const id = (up ? i : j) % threads;
      const slub = up
        ? 0.06 * (rowSin[y] * phaseCos[id] + rowCos[y] * phaseSin[id])
        : 0.06 * (colSin[x] * phaseCos[id] + colCos[x] * phaseSin[id]);
      let shade = profile[Math.round(across * 256)] + slub;
      if (cloth.fibre > 0) shade += (rand() - 0.5) * 2 * cloth.fibre;
      const c = up ? warpColours[i % threads] : weftColours[j % threads];
      d[o] = c[0] * shade;
      d[o + 1] = c[1] * shade;
      d[o + 2] = c[2] * shade;
    }
  }
  return p;
}

/** Lift plans (which thread is on top), as used by hand weavers. */
export const liftPlans = {
  plain: (i: number, j: number) => ((i + j) & 1) === 0,
  twill22: (i: number, j: number) => (((i + j) % 4) + 4) % 4 < 2,
  /** 2/2 twill whose diagonal reverses every `band` warp threads. */
  herringbone: (band: number) => (i: number, j: number) => {
    const dir = Math.floor(i / band) % 2 === 0 ? 1 : -1;
    return (((i * dir + j) % 4) + 4) % 4 < 2;
  },
};

/** A colour scaled by 1 +- amount x (jitter - 0.5): thread-to-thread dye variation. */
export function vary(c: Rgb, jitter: number, amount: number): Rgb {
  const k = 1 + (jitter - 0.5) * amount;
  return [c[0] * k, c[1] * k, c[2] * k];
}
