import { sinc, type Kernel } from './kernel.js';
import { kaiserWindow } from './windowed-sinc.js';

/**
 * Parameters of a Kaiser-windowed sinc low-pass, in kernel units (output pixels once
 * stretched): h(x) = 2 fc sinc(2 fc x) w(x), w the Kaiser window of half-width `radius`.
 */
export interface KaiserSincDesign {
  /** Cut-off in cycles per kernel unit; 0.5 is the (new) Nyquist frequency. */
  cutoff: number;
  radius: number;
  beta: number;
}

/**
 * A windowed-sinc kernel from its design. Its frequency response is the ideal low-pass
 * (1 below `cutoff`, 0 above) convolved with the window's transform, so the -6 dB point sits
 * at `cutoff` and the transition width shrinks as 1/radius; beta trades that width against
 * stopband depth (Kaiser 1974: about 0.1102 (A - 8.7) for A dB of attenuation).
 */
export function kaiserSinc(name: string, d: KaiserSincDesign, source: string): Kernel {
  const w = kaiserWindow(d.radius, d.beta);
  const g = 2 * d.cutoff;
  return {
    name,
    support: d.radius,
    // sinc(2 fc x) vanishes at the non-zero integers exactly when fc = 1/2.
    interpolating: d.cutoff === 0.5,
    stretch: true,
    source,
    weight: (x) => g * sinc(g * x) * w(x),
  };
}
