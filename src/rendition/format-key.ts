import { LRUCache } from 'lru-cache';
import { negotiateAnimated, negotiateFormat } from '../codec/negotiate.js';
import type { RenditionQuery } from '../schemas/rendition.js';

// Browsers send a handful of distinct Accept headers, so a small memo answers nearly every
// request; it is bounded in bytes, so a client inventing headers only churns it.
const choices = new LRUCache<string, string>({
  maxSize: 2 ** 20,
  sizeCalculation: (value, accept) => 2 * (accept.length + value.length) + 64,
});

/** What an absent format may give for this Accept header: the choice for opaque, alpha and animated images. */
function acceptChoices(accept: string | undefined): string {
  if (accept === undefined) return `${negotiateFormat(undefined, false)}/${negotiateFormat(undefined, true)}/${negotiateAnimated(undefined)}`;
  let known = choices.get(accept);
  if (known === undefined) {
    known = `${negotiateFormat(accept, false)}/${negotiateFormat(accept, true)}/${negotiateAnimated(accept)}`;
    choices.set(accept, known);
  }
  return known;
}

/**
 * The format part of a rendition's cache key: the format, or for auto the choices Accept
 * allows (so two Accept headers that negotiate alike share one cache entry).
 */
export function formatKey(q: Pick<RenditionQuery, 'format'>, accept: string | undefined): string {
  return q.format === undefined ? `negotiated:${acceptChoices(accept)}` : q.format;
}
