export { makePlan } from './make.js';
export { formatPlanHeader } from './header.js';
export { autoKernel } from './axis.js';
export { MAX_SIDE } from './validate.js';
