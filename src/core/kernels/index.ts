export type { Kernel } from './kernel.js';
export { sinc } from './kernel.js';
export { kernelNames, findKernel, BANDLIMIT_DESIGN } from './table.js';
export { besselI0, kaiserWindow } from './windowed-sinc.js';
export { kaiserSinc, type KaiserSincDesign } from './designed.js';
