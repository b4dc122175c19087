import type { Kernel } from '../kernels/index.js';

/**
 * Smallest factor left for the exact resample after the pyramid. A reduce-by-2 folds the
 * band near its input's Nyquist frequency down to low frequencies, attenuated by
 * cos^4(pi f) (Burt & Adelson 1983, CHECKS.md): what lands on the new Nyquist frequency
 * 1 / (2 s_rem) of the final stage comes through at sin^4(pi / (4 s_rem)), which is
 * -41 dB at s_rem = 2.5 and grows quickly below it.
 */
const MIN_FINAL_SCALE = 2.5;

/**
 * Number of reduce-by-2 pyramid stages before the exact resample: as many as keep the
 * remaining factor >= MIN_FINAL_SCALE, for the designed kernel only (its final filter
 * compensates the pyramid's droop). The published kernels keep their exact published response
 * and run directly at any factor (their cost per source pixel does not grow with the factor
 * either, only per output pixel).
 */
export function pyramidLevelsFor(kernel: Kernel, scale: number): number {
  if (kernel.name !== 'bandlimit') return 0;
  let levels = 0;
  while (scale / 2 ** (levels + 1) >= MIN_FINAL_SCALE) levels++;
  return levels;
}
