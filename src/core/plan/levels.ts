import type { Kernel } from '../kernels/index.js';

/** Number of reduce-by-2 pyramid stages before the exact resample (none yet for any kernel). */
export function pyramidLevelsFor(_kernel: Kernel, _scale: number): number {
  return 0;
}
