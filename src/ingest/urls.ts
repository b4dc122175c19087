/**
 * URLs of the renditions a manifest lists: the rendition route with exactly the parameters the
 * ingest rendered with, so a GET on one is a cache hit. Signed when signing is on.
 */
import { renditionsPrefix } from '../schemas/paths.js';
import { signUrl } from '../security/signing.js';

/** Each path segment percent-encoded on its own (RFC 3986 section 3.3), slashes kept. */
function encodeKey(key: string): string {
  return key.split('/').map(encodeURIComponent).join('/');
}

/**
 * `extra`: the rendition parameters the upload asked for (prefilter, kernel, light), in that
 * order. `publicUrl` (server.publicUrl, no trailing slash) makes the URL absolute; the
 * signature covers the path and query only, so the same signature holds behind any host.
 */
export function renditionUrl(
  sourceKey: string,
  width: number,
  format: string,
  signingKey?: string,
  extra: Readonly<Record<string, string>> = {},
  publicUrl: string | null = null,
): string {
  const path = `${renditionsPrefix}${encodeKey(sourceKey)}`;
  const query: Record<string, string> = { width: String(width), format, ...extra };
  return (publicUrl ?? '') + (signingKey ? signUrl(path, query, signingKey) : `${path}?${new URLSearchParams(query)}`);
}
