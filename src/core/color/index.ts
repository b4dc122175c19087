export { srgbEncode, srgbToLinear8, srgbToLinear16, linearToSrgb8, linearToSrgb16 } from './srgb.js';
export { srgbQuantiser8, srgbQuantiser16, quantiseRun, type SrgbQuantiser } from './encoder.js';
export { rowCodec, decodeRow, encodeRow, type RowCodec } from './rows.js';
export {
  rgbToXyz, rgbToRgb, luminanceCoefficients, adobeRgbDecode, gamutSpaces,
  srgbSpace, displayP3Space, adobeRgbSpace, rec2020Space,
  type RgbSpace, type GamutName, type Matrix3, type Chromaticity,
} from './primaries.js';
export { linearMeanColour, hexColour } from './mean.js';
