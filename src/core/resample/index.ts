export { resampleAxis } from './separable.js';
export { buildWeights, type WeightTable } from './weights.js';
export { stretchedFilter, type AxisFilter } from './filter.js';
export { finalTable, planTable } from './axis-table.js';
export { resampleStream, streamLayout, type RowSource } from './stream.js';
export { planResponse, planResponseOf } from './response.js';
