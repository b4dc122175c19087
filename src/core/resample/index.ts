export { resampleAxis } from './separable.js';
export { buildWeights, type WeightTable } from './weights.js';
export { stretchedFilter, convolveGaussian, type AxisFilter } from './filter.js';
export { finalTable, planTable, levelLength } from './axis-table.js';
export { resampleStream, streamLayout, type RowSource } from './stream.js';
export { planResponse, tableResponse } from './response.js';
