import { hexOf } from './colour.js';
import type { RenditionQuery } from './rendition.js';

/** Shortest decimal that round-trips, with at most 6 fractional digits. */
function num(n: number): string {
  return String(Number(n.toFixed(6)));
}

function percent(f: number): string {
  return `${num(f * 100)}%`;
}

/**
 * The canonical form of a rendition query: every parameter whose normalised value differs from
 * its default, as `name=value` joined by `&` in name order, values percent-encoded, the
 * signature left out. Two queries that ask for the same rendition have the same canonical form
 * (`width=0480&density=1` and `width=480` both give `width=480`), so the cache key cannot be
 * busted with spellings. This form is for the cache key only: signatures do not use it, they
 * cover the URL's own parameters re-encoded strictly (`canonicalSigningQuery` in
 * src/security/signing.ts), so `width=0480` and `width=480` need different signatures.
 * Parameters that cannot change the rendition are left out too: with one side given, `fit`
 * matters only as scale-down (it caps enlargement) and `position` not at all; `fill` ignores
 * `position`. `gamut` p3 and rec2020 give what source gives (a wide source kept as Display P3),
 * so only srgb is written.
 */
export function canonicalQuery(q: RenditionQuery): string {
  const oneSide = q.width === undefined || q.height === undefined;
  const fit = oneSide && q.fit !== 'scale-down' ? 'contain' : q.fit;
  const position = oneSide || fit === 'fill' ? '50% 50%' : `${percent(q.position.x)} ${percent(q.position.y)}`;
  const pairs: [string, string][] = [];
  const add = (name: string, value: string | undefined, dflt?: string) => {
    if (value !== undefined && value !== dflt) pairs.push([name, value]);
  };
  add('background', hexOf(q.background), '#ffffff');
  add('density', num(q.density), '1');
  add('enlarge', q.enlarge, 'limited');
  add('fit', fit, 'contain');
  add('format', q.format);
  add('gamut', q.gamut === 'srgb' ? 'srgb' : undefined);
  add('height', q.height === undefined ? undefined : String(q.height));
  add('kernel', q.kernel, 'auto');
  add('light', q.light, 'linear');
  add('position', position, '50% 50%');
  add('prefilter', typeof q.prefilter === 'number' ? num(q.prefilter) : q.prefilter, 'auto');
  add('quality', q.quality === undefined ? undefined : String(q.quality));
  add('still', q.still === undefined ? undefined : String(q.still));
  add('width', q.width === undefined ? undefined : String(q.width));
  return pairs.map(([k, v]) => `${k}=${encodeURIComponent(v)}`).join('&');
}
