/**
 * Animations as the decoder gives them: frames of equal size stacked top to bottom in one
 * raster. The resampler's weight tables span a whole raster, so a stack resampled as one
 * would blend the bottom rows of a frame into the top rows of the next (a row's taps reach
 * support x scale rows across the seam). Each frame is therefore its own raster, planned and
 * resampled alone with the same plan, and the results are stacked again: no output row reads
 * a row of another frame.
 */
import type { PixelRaster } from '../types.js';

/** Frame `index` of `frames` stacked frames: a view on the same samples, no copy. */
export function frameOf(src: PixelRaster, frames: number, index: number): PixelRaster {
  if (!(Number.isInteger(frames) && frames >= 1 && src.height % frames === 0)) {
    throw new RangeError(`${src.height} rows do not split into ${frames} equal frames`);
  }
  if (!(Number.isInteger(index) && index >= 0 && index < frames)) throw new RangeError(`no frame ${index} of ${frames}`);
  const height = src.height / frames;
  const size = src.width * height * src.channels;
  return { ...src, height, data: src.data.subarray(index * size, (index + 1) * size) };
}

/** Stacks equal rasters top to bottom (a new raster; the first one's gamut). */
export function stackFrames(frames: readonly PixelRaster[]): PixelRaster {
  if (frames.length === 0) throw new RangeError('no frames to stack');
  const [first] = frames;
  const deep = first.data instanceof Uint16Array;
  const size = first.width * first.height * first.channels;
  const data = deep ? new Uint16Array(size * frames.length) : new Uint8Array(size * frames.length);
  frames.forEach((f, i) => {
    if (f.width !== first.width || f.height !== first.height || f.channels !== first.channels || f.data.length !== size) {
      throw new RangeError('frames differ in size');
    }
    data.set(f.data, i * size);
  });
  return { ...first, data, height: first.height * frames.length };
}

/**
 * Renders every frame of `src` with `render` (the same plan for each) and stacks the results.
 * Pure when `render` is; the frames may be rendered concurrently.
 */
export async function renderFrames(
  src: PixelRaster,
  frames: number,
  render: (frame: PixelRaster) => Promise<PixelRaster> | PixelRaster,
): Promise<PixelRaster> {
  const out = await Promise.all(Array.from({ length: frames }, (_, i) => render(frameOf(src, frames, i))));
  return stackFrames(out);
}
