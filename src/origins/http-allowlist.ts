/**
 * The upstream allowlist: which scheme://host:port an HTTP origin may fetch from, and how a
 * source path `<host>[:port]/<path>` becomes a URL on one of them.
 */
import { FoldwiseError } from '../errors.js';

export interface AllowedUpstream {
  /** e.g. "https://cdn.example.org" or "http://127.0.0.1:8123" (URL.origin form). */
  origin: string;
  /** host[:port] as written in source paths; the port only when not the scheme's default. */
  authority: string;
}

/**
 * Parses allowlist entries. A bare host means https. Paths, queries, credentials and
 * wildcards are refused at start, so a typo cannot widen the list.
 */
export function parseAllowHosts(entries: string[]): AllowedUpstream[] {
  return entries.map((entry) => {
    const text = entry.includes('://') ? entry : `https://${entry}`;
    let url: URL;
    try {
      url = new URL(text);
    } catch {
      throw new RangeError(`upstream allowlist entry is not a host or origin: ${entry}`);
    }
    const bare = url.pathname === '/' && !url.search && !url.hash && !url.username && !url.password;
    if (!bare || (url.protocol !== 'https:' && url.protocol !== 'http:') || url.hostname.includes('*')) {
      throw new RangeError(`upstream allowlist entry must be scheme://host[:port] only: ${entry}`);
    }
    return { origin: url.origin, authority: url.host };
  });
}

/** Is this absolute URL on the allowlist (same scheme, host and port)? */
export function isAllowedUrl(url: URL, allowed: AllowedUpstream[]): boolean {
  if (url.username || url.password) return false;
  return allowed.some((a) => a.origin === url.origin);
}

/** Control characters (C0, DEL, C1) and backslashes have no place in a source path. */
const unsafe = /[\u0000-\u001f\u007f-\u009f\\]/;

/**
 * Turns `<host>[:port]/<path>` into the upstream URL. The first allowlist entry whose
 * authority matches wins, so list https before http for the same host.
 */
export function resolveSourceUrl(source: string, allowed: AllowedUpstream[]): URL {
  const slash = source.indexOf('/');
  const authority = (slash < 0 ? source : source.slice(0, slash)).toLowerCase();
  const rest = slash < 0 ? '' : source.slice(slash + 1);
  const segments = rest.split('/');
  if (rest === '' || unsafe.test(source) || segments.some((s) => s === '' || s === '.' || s === '..')) {
    throw new FoldwiseError('ERR_SOURCE_PATH_INVALID', 'upstream source must be <host>/<path> with plain segments');
  }
  const entry = allowed.find((a) => a.authority === authority);
  if (!entry) {
    throw new FoldwiseError('ERR_UPSTREAM_FORBIDDEN', `upstream host ${JSON.stringify(authority)} is not on the allowlist`);
  }
  return new URL(`${entry.origin}/${segments.map(encodeURIComponent).join('/')}`);
}
