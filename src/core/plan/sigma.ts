import type { PrefilterChoice } from '../types.js';

/**
 * Content-adaptive sigma is capped at half an output pixel (0.5 * scale source pixels), the
 * blur Lowe (2004) assumes a freshly sampled image carries: past it a rendition looks soft
 * however strong the periodic content is.
 */
const ADAPTIVE_CAP = 0.5;

/**
 * The Gaussian prefilter sigma of one axis, in source pixels, and a phrase saying why.
 *
 * - A number is used as given; 'none' is 0; upscales get none with 'auto' (nothing folds).
 * - 'auto' on a downscale: the stretched kernel is itself the anti-alias low-pass, so the
 *   planned sigma is 0 and only the content-adaptive sigma from the alias-risk analysis is
 *   added, in quadrature (blurs combine as sqrt(a^2 + b^2), Lowe 2004, CHECKS.md), capped
 *   at ADAPTIVE_CAP output pixels. The published rules were measured and rejected as the
 *   default: with the designed kernel, Lowe's combination to half an output pixel,
 *   sqrt((s/2)^2 - 0.5^2), and scikit-image's max(0, (s - 1)/2) leave the zone-plate residual
 *   where it was (-41.5 dB) but raise the passband error from -45 dB to -14..-25 dB and keep
 *   only 43..92 % of a grating at 0.8x Nyquist (scripts/fidelity.ts prints both rows).
 */
export function prefilterSigma(
  choice: PrefilterChoice,
  scale: number,
  adaptive: number,
): { sigma: number; from: 'kernel' | 'content' | 'asked' | 'none'; why: string | undefined } {
  if (typeof choice === 'number') return { sigma: choice, from: 'asked', why: `sigma ${choice} (asked)` };
  if (choice === 'none') return { sigma: 0, from: 'none', why: undefined };
  if (scale <= 1) return { sigma: 0, from: 'none', why: 'no prefilter on upscale' };
  if (!(adaptive > 0)) return { sigma: 0, from: 'kernel', why: undefined };
  const cap = ADAPTIVE_CAP * scale;
  const combined = adaptive; // sqrt(planned^2 + adaptive^2) with the planned sigma 0
  const sigma = Math.min(cap, combined);
  return { sigma, from: 'content', why: `sigma raised by content to ${sigma.toFixed(2)}${combined > cap ? ' (capped)' : ''}` };
}
