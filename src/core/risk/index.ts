/** Alias risk: the visibility model (patterns in threshold units), folded energy, peaks, region grid, prefilter=auto. */
export { adaptiveFilter, assessRisk, levelWords, planGains, type PlanGains, type RiskReport } from './assess.js';
export type { Advice } from './advice.js';
export { cleanWidth } from './advice.js';
export { contrastThreshold, CSS_PIXEL_DEGREES, mannosSakrison, PEAK_SENSITIVITY, viewingAt, type Viewing } from './csf.js';
export { CUT_MIN } from './cutoff.js';
export type { PlanResponse } from './filter.js';
export type { RiskGrid } from './grid.js';
export { PLAIN_MARGIN, VISIBLE_MARGIN, visibilityLevel, visibilityScore } from './levels.js';
export { aliasFrequency, gaussianResponse, nyquistOf } from './model.js';
export type { RiskPeak } from './peaks.js';
export { CEIL_DB, FLOOR_DB, HIGH_DB, levelOf, LOW_DB, scoreOf, type RiskLevel } from './score.js';
export { BEAT_LOW, type VisiblePattern } from './visibility.js';
export { analyzeSpectrum, type SourceSpectrum } from '../spectrum/index.js';
