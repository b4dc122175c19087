import type { Kernel } from './kernel.js';
import { bcCubic } from './cubic.js';
import { lanczos } from './windowed-sinc.js';
import { box, gaussian, nearest, triangle } from './simple.js';
import { kaiserSinc, type KaiserSincDesign } from './designed.js';

/**
 * The designed default for downscaling ("bandlimit"): a Kaiser-windowed sinc stretched by the
 * factor. Targets (DESIGN.md): flat to 1 % below 0.5x the new Nyquist, >= 85 % at 0.8x, <= 1 %
 * (-40 dB) beyond 1.3x, <= 3 % step overshoot. The transition 0.8x..1.3x Nyquist is 0.25 cycles
 * per output pixel wide, and a Kaiser window needs an order (full length) of about
 * (A - 8) / (2.285 * 2 pi * 0.25) ~ 9 samples for A = 40 dB (Kaiser 1974), a half-width of
 * about 4.5, so the radius is 5 output pixels for margin and beta = 5 (about 0.1102 (A - 8.7),
 * A ~ 54 dB) for the stopband.
 * The cut-off sits a little under Nyquist (0.49) because the window's transition is
 * symmetric about it while the targets are not (0.8x must pass, 1.3x must stop); on the zone
 * plate that lowers the 8x residual from -38.4 to -39.0 dB for 1 % less at 0.8x. Measured
 * with scripts/fidelity.ts: residual -41.5 / -41.5 / -40.9 / -39.0 dB at 2 / 4 / 5.33 / 8x,
 * passband -45 dB, 89-90 % at 0.8x, 1.5 % overshoot, all without the ringing clamp (limit.ts), which
 * brings the worst-phase overshoot from 7.8 to 2.6 % for -40.9 dB residual and -41.4 / -43.0 dB
 * passband at 2 / 5.33x. Lanczos-3 stretched passes about 7 % at
 * 1.3x and keeps about 82 % at 0.8x, which is why it is not the default.
 */
export const BANDLIMIT_DESIGN: KaiserSincDesign = { cutoff: 0.49, radius: 5, beta: 5 };

/** Every kernel the `kernel` parameter accepts, by name. One table, no other registry. */
const ALL: readonly Kernel[] = [
  { ...kaiserSinc('bandlimit', BANDLIMIT_DESIGN, 'Kaiser-windowed sinc at the new Nyquist (designed)'), limitsRinging: true },
  lanczos(3),
  lanczos(2),
  // Keys (1981) a = -0.5 equals Mitchell-Netravali B = 0, C = 0.5 (CHECKS.md).
  bcCubic('catmull-rom', 0, 0.5, 'Keys cubic a=-0.5 (Keys 1981)'),
  bcCubic('mitchell-netravali', 1 / 3, 1 / 3, 'Mitchell-Netravali B=C=1/3 (1988)'),
  gaussian,
  triangle,
  box,
  nearest,
];

const BY_NAME = new Map(ALL.map((k) => [k.name, k]));

/** Names accepted by the `kernel` parameter besides 'auto'. */
export const kernelNames: readonly string[] = Object.freeze(ALL.map((k) => k.name));

/**
 * Earlier one-word spellings and the names that replaced them: the query answers an old
 * spelling with a 400 naming the new one. Append only; every value must be a name above.
 */
export const renamedKernels: Readonly<Record<string, string>> = Object.freeze({
  lanczos2: 'lanczos-2',
  lanczos3: 'lanczos-3',
  mitchell: 'mitchell-netravali',
  nearest: 'nearest-neighbour',
});

/** The kernel of that name, or undefined. */
export function findKernel(name: string): Kernel | undefined {
  return BY_NAME.get(name);
}
