/**
 * sRGB codes <-> Oklab (Ottosson, B. (2020), "A perceptual color space for image processing":
 * the matrices of the sRGB-linear form), through the sRGB curve of IEC 61966-2-1.
 */
import { linearToSrgb8, srgbToLinear8 } from '../../core/color/index.js';
import type { Rgb } from './rgb-image.js';

export interface Lab {
  L: number;
  a: number;
  b: number;
}

export function toOklab(rgb: Rgb): Lab {
  const [r, g, b] = rgb.map((c) => srgbToLinear8[c]);
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return {
    L: 0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    a: 1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    b: 0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s,
  };
}

/** Back to 8-bit sRGB codes; colours outside the gamut are clipped per channel. */
export function fromOklab({ L, a, b }: Lab): Rgb {
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.291485548 * b) ** 3;
  const linear = [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s,
  ];
  return linear.map((v) => linearToSrgb8(v)) as unknown as Rgb;
}
