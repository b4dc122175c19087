export { makePlan } from './make.js';
export { formatPlanHeader } from './header.js';
