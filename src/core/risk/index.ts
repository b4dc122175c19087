/** Alias risk: the folding model, score and level, peaks, region grid, recommended and adaptive sigma. */
export { adaptiveSigma, assessRisk, ADAPTIVE_MAX, type RiskReport } from './assess.js';
export type { PlanResponse } from './filter.js';
export type { RiskGrid } from './grid.js';
export { aliasFrequency, gaussianResponse, nyquistOf } from './model.js';
export type { RiskPeak } from './peaks.js';
export { CEIL_DB, FLOOR_DB, HIGH_DB, levelOf, LOW_DB, scoreOf, type RiskLevel } from './score.js';
export { analyzeSpectrum, type SourceSpectrum } from '../spectrum/index.js';
