import type { OutputFormat } from './formats.js';

/**
 * Choosing an output format from an HTTP Accept header (RFC 9110 §12.5.1).
 *
 * Rules:
 * - The most specific media range decides a format's q-value (`image/webp` over `image/*`
 *   over `*\/*`); q=0 means "not acceptable" (RFC 9110 §12.4.2).
 * - AVIF and WebP count only when named explicitly: a client that says `image/*` may
 *   well not decode them (common practice). JPEG and PNG also match the wildcards.
 * - The highest q wins; ties go to the preference order: avif, webp, then jpeg before png
 *   for opaque images and png before jpeg for images with alpha.
 * - Nothing acceptable (or no header at all): jpeg, or png when the image has alpha. RFC
 *   9110 allows a default instead of 406, and every browser decodes both.
 * - An animation: WebP when the client names it with q > 0, else GIF (every browser decodes
 *   it; sharp writes no animated AVIF).
 */

const opaqueOrder = ['avif', 'webp', 'jpeg', 'png'] as const;
const alphaOrder = ['avif', 'webp', 'png', 'jpeg'] as const;
const mediaType: Record<OutputFormat, string> = {
  avif: 'image/avif',
  webp: 'image/webp',
  jpeg: 'image/jpeg',
  png: 'image/png',
  gif: 'image/gif',
};
const wildcardOk: Record<OutputFormat, boolean> = { avif: false, webp: false, jpeg: true, png: true, gif: true };

/** Media ranges beyond this many are ignored: a header is not a work queue. */
const maxRanges = 64;
/** qvalue grammar of RFC 9110 §12.4.2. */
const qvalue = /^(?:0(?:\.\d{0,3})?|1(?:\.0{0,3})?)$/;

interface Range {
  type: string;
  q: number;
}

function parseAccept(accept: string): Range[] {
  const ranges: Range[] = [];
  for (const part of accept.split(',', maxRanges)) {
    const [rawType, ...params] = part.split(';');
    const type = rawType.trim().toLowerCase();
    if (!/^[a-z0-9!#$&^_.+-]+\/[a-z0-9!#$&^_.+*-]+$/.test(type)) continue;
    let q = 1;
    let valid = true;
    for (const p of params) {
      const [k, v = ''] = p.split('=');
      if (k.trim().toLowerCase() !== 'q') continue;
      const text = v.trim();
      if (!qvalue.test(text)) valid = false;
      else q = Number(text);
    }
    if (valid) ranges.push({ type, q });
  }
  return ranges;
}

/** q of one format: exact match beats image/* beats *\/*; undefined when nothing matches. */
function qualityOf(format: OutputFormat, ranges: Range[]): number | undefined {
  let best: { specificity: number; q: number } | undefined;
  for (const r of ranges) {
    let specificity = -1;
    if (r.type === mediaType[format]) specificity = 2;
    else if (wildcardOk[format] && r.type === 'image/*') specificity = 1;
    else if (wildcardOk[format] && r.type === '*/*') specificity = 0;
    if (specificity < 0) continue;
    // Equal specificity twice (a sloppy header): keep the larger q.
    if (!best || specificity > best.specificity || (specificity === best.specificity && r.q > best.q)) {
      best = { specificity, q: r.q };
    }
  }
  return best?.q;
}

/**
 * The output format when `format` is absent: the best the client accepts, by q-value, then by our
 * preference (avif, webp, jpeg; png where alpha needs it).
 */
export function negotiateFormat(
  accept: string | undefined,
  hasAlpha: boolean,
): 'avif' | 'webp' | 'jpeg' | 'png' {
  const order: readonly ('avif' | 'webp' | 'jpeg' | 'png')[] = hasAlpha ? alphaOrder : opaqueOrder;
  const fallback = order[2];
  if (accept === undefined || accept.trim() === '') return fallback;
  const ranges = parseAccept(accept);
  let chosen: (typeof order)[number] | undefined;
  let chosenQ = 0;
  for (const format of order) {
    const q = qualityOf(format, ranges) ?? 0;
    if (q > chosenQ) {
      chosen = format;
      chosenQ = q;
    }
  }
  return chosen ?? fallback;
}

/** The output format of an animated source when `format` is absent: webp if named with q > 0, else gif. */
export function negotiateAnimated(accept: string | undefined): 'webp' | 'gif' {
  if (accept === undefined) return 'gif';
  return (qualityOf('webp', parseAccept(accept)) ?? 0) > 0 ? 'webp' : 'gif';
}
