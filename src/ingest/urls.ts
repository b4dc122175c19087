/**
 * URLs of the renditions a manifest lists: the rendition route with exactly the parameters the
 * ingest rendered with, so a GET on one is a cache hit. Signed when signing is on.
 */
import { renditionsPrefix } from '../routes/renditions.js';
import { signUrl } from '../security/signing.js';

/** Each path segment percent-encoded on its own (RFC 3986 section 3.3), slashes kept. */
function encodeKey(key: string): string {
  return key.split('/').map(encodeURIComponent).join('/');
}

export function renditionUrl(sourceKey: string, width: number, format: string, signingKey?: string): string {
  const path = `${renditionsPrefix}${encodeKey(sourceKey)}`;
  const query = { width: String(width), format };
  return signingKey ? signUrl(path, query, signingKey) : `${path}?width=${width}&format=${format}`;
}
