/**
 * If-None-Match against our strong ETag, by the weak comparison RFC 9110 §13.1.2 prescribes
 * for this header: `*` matches any current representation; `W/` prefixes are ignored.
 */
export function matchesIfNoneMatch(header: string | undefined, etag: string): boolean {
  if (header === undefined) return false;
  const trimmed = header.trim();
  if (trimmed === '*') return true;
  const opaque = etag.replace(/^W\//, '');
  return trimmed.split(',').some((tag) => tag.trim().replace(/^W\//, '') === opaque);
}
