/**
 * The rendition ladder: which widths an upload is rendered at.
 *
 * The default rungs cover phones (160..480), tablets and laptops (640..1280) and large or
 * high-density screens (1600..2560); the spacing keeps each rung within ~1.5x of the next so a
 * browser picking from `srcset` never downloads much more than it needs (common practice).
 */
export const DEFAULT_LADDER: readonly number[] = [160, 320, 480, 640, 800, 1080, 1280, 1600, 1920, 2560];

/**
 * Widths to render for a source `sourceWidth` pixels wide: ascending, distinct, never wider than
 * the source (a ladder never upscales: an enlarged rendition adds bytes, not detail).
 *
 * With no request, the default ladder is used and the source width itself closes the ladder
 * when it falls between rungs, so the largest candidate carries every source pixel. Requested
 * widths above the source are clamped to the source width.
 */
export function ladderFor(sourceWidth: number, requested?: readonly number[]): number[] {
  if (!(sourceWidth >= 1) || !Number.isInteger(sourceWidth)) {
    throw new RangeError(`sourceWidth must be a positive integer, got ${sourceWidth}`);
  }
  const base = requested && requested.length > 0 ? requested : DEFAULT_LADDER;
  const widths = new Set<number>();
  for (const w of base) {
    if (!(w >= 1) || !Number.isInteger(w)) throw new RangeError(`width must be a positive integer, got ${w}`);
    widths.add(Math.min(w, sourceWidth));
  }
  if (!requested || requested.length === 0) {
    const top = DEFAULT_LADDER[DEFAULT_LADDER.length - 1];
    if (sourceWidth < top) widths.add(sourceWidth);
  }
  return [...widths].sort((a, b) => a - b);
}

/** Height of a rendition `width` wide that keeps the source's aspect ratio (at least 1 px). */
export function heightFor(sourceWidth: number, sourceHeight: number, width: number): number {
  return Math.max(1, Math.round((sourceHeight * width) / sourceWidth));
}
