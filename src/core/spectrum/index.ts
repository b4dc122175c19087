/** Spectrum estimation: FFT, window, Welch estimate of a source's linear-light luminance. */
export { fft2d, fftPlan, fftInPlace, type FftPlan } from './fft.js';
export { hannWindow } from './window.js';
export { analyzeSpectrum, type SourceSpectrum } from './welch.js';
