import type { Picture } from './picture.js';
import { rgb } from './picture.js';
import { liftPlans, vary, weave } from './weave.js';

/** Indigo warp on an ecru weft in 2/2 twill: a denim-like diagonal of 3.2 px threads. */
export function twill(): Picture {
  const indigo = rgb(40, 56, 104);
  const ecru = rgb(216, 206, 182);
  return weave({
    width: 2400,
    height: 1600,
    pitch: 3.2,
    seed: 0x7e11,
    warp: (_i, j) => vary(indigo, j, 0.25),
    weft: (_j, j) => vary(ecru, j, 0.1),
    warpUp: liftPlans.twill22,
    fibre: 0.05,
  });
}

/** Navy shirting with a white warp thread every sixth: pinstripes 13.2 px apart. */
export function pinstripe(): Picture {
  const navy = rgb(28, 36, 72);
  const white = rgb(236, 236, 232);
  return weave({
    width: 2000,
    height: 2400,
    pitch: 2.2,
    seed: 0x5719,
    warp: (i, j) => (i % 6 === 0 ? white : vary(navy, j, 0.08)),
    weft: (_j, j) => vary(navy, j, 0.08),
    warpUp: liftPlans.plain,
    fibre: 0,
  });
}

/**
 * Herringbone tweed: dark heathered warp over a light heathered weft in 2/2 twill, the
 * diagonal turning every 8 threads, with a rare rust fleck in the weft.
 */
export function herringbone(): Picture {
  const dark = [rgb(64, 60, 58), rgb(92, 82, 70)];
  const light = [rgb(184, 172, 148), rgb(160, 146, 122), rgb(156, 82, 50)];
  return weave({
    width: 2400,
    height: 1800,
    pitch: 2.6,
    seed: 0x4e7b,
    warp: (_i, j) => vary(dark[j < 0.6 ? 0 : 1], (j * 7.31) % 1, 0.2),
    weft: (_j, j) => vary(light[j < 0.6 ? 0 : j < 0.97 ? 1 : 2], (j * 3.17) % 1, 0.15),
    warpUp: liftPlans.herringbone(8),
    fibre: 0.06,
  });
}

/** Red and white gingham: seven red threads, seven white, both ways, in plain weave. */
export function gingham(): Picture {
  const red = rgb(196, 32, 44);
  const white = rgb(246, 244, 240);
  const stripe = (n: number, j: number) => (Math.floor(n / 7) % 2 === 0 ? vary(red, j, 0.06) : white);
  return weave({
    width: 2000,
    height: 2000,
    pitch: 2.4,
    seed: 0x9196,
    warp: stripe,
    weft: stripe,
    warpUp: liftPlans.plain,
    fibre: 0,
  });
}
