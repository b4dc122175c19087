/** Spectrum estimation: FFT, window, Welch estimate of a source's linear-light luminance. */
export { fftPlan, fftInPlace, type FftPlan } from './fft.js';
export { fft2d } from './fft2d.js';
export { hannWindow } from './window.js';
export { analyzeSpectrum, type SourceSpectrum } from './welch.js';
