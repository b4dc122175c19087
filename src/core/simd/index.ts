export { simdKernels, setSimdEnabled, type SimdKernels } from './kernels.js';
export { arenaFor, arenaBytes, type Arena } from './arena.js';
