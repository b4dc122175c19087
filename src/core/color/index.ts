export { srgbEncode, srgbToLinear8, srgbToLinear16, linearToSrgb8, linearToSrgb16 } from './srgb.js';
export { srgbQuantiser8, srgbQuantiser16, quantiseRun, type SrgbQuantiser } from './encoder.js';
export { rowCodec, decodeRow, encodeRow, type RowCodec } from './rows.js';
export { linearMeanColour, hexColour } from './mean.js';
