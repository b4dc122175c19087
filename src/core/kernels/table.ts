import type { Kernel } from './kernel.js';
import { bcCubic } from './cubic.js';
import { lanczos } from './windowed-sinc.js';
import { box, gaussian, nearest, triangle } from './simple.js';
import { kaiserSinc, type KaiserSincDesign } from './designed.js';

/**
 * The designed default for downscaling; see docs in designed.ts and the fidelity script.
 * Numbers chosen by the design sweep (scripts/fidelity.ts prints what they reach).
 */
export const BANDLIMIT_DESIGN: KaiserSincDesign = { cutoff: 0.5, radius: 4, beta: 4 };

/** Every kernel the `kernel` parameter accepts, by name. One table, no other registry. */
const ALL: readonly Kernel[] = [
  kaiserSinc('bandlimit', BANDLIMIT_DESIGN, 'Kaiser-windowed sinc at the new Nyquist (designed)'),
  lanczos(3),
  lanczos(2),
  // Keys (1981) a = -0.5 equals Mitchell-Netravali B = 0, C = 0.5 (CHECKS.md).
  bcCubic('catmull-rom', 0, 0.5, 'Keys cubic a=-0.5 (Keys 1981)'),
  bcCubic('mitchell', 1 / 3, 1 / 3, 'Mitchell-Netravali B=C=1/3 (1988)'),
  gaussian,
  triangle,
  box,
  nearest,
];

const BY_NAME = new Map(ALL.map((k) => [k.name, k]));

/** Names accepted by the `kernel` parameter besides 'auto'. */
export const kernelNames: readonly string[] = Object.freeze(ALL.map((k) => k.name));

/** The kernel of that name, or undefined. */
export function findKernel(name: string): Kernel | undefined {
  return BY_NAME.get(name);
}
