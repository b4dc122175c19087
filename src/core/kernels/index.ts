export type { Kernel } from './kernel.js';
export { kernelNames, findKernel } from './table.js';
