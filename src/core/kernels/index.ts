export type { Kernel } from './kernel.js';
export { kernelNames, findKernel, renamedKernels } from './table.js';
