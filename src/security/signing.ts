/**
 * Signed URLs: HMAC-SHA256 (RFC 2104; SHA-256 from FIPS 180-4) over the request path and the
 * canonical query without its `signature` parameter, written base64url (RFC 4648 section 5,
 * no padding). Several keys verify (rotation); the first one signs.
 */
import { createHmac, timingSafeEqual } from 'node:crypto';
import { FoldwiseError } from '../errors.js';

/** The query parameter that carries the signature. */
export const signatureParam = 'signature';

/** Query input: URLSearchParams, or a parsed query object as Fastify gives it. */
export type QueryInput = URLSearchParams | Record<string, string | string[] | undefined>;

/** RFC 3986 section 2.3 unreserved characters stay; everything else is percent-encoded. */
function encodeStrict(text: string): string {
  return encodeURIComponent(text).replace(/[!'()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
}

function pairs(query: QueryInput): Array<[string, string]> {
  if (query instanceof URLSearchParams) return [...query.entries()];
  const out: Array<[string, string]> = [];
  for (const [name, value] of Object.entries(query)) {
    if (value === undefined) continue;
    for (const v of Array.isArray(value) ? value : [value]) out.push([name, String(v)]);
  }
  return out;
}

const byCodeUnits = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/**
 * The query as signed: every parameter except `signature`, sorted by name then value (code
 * unit order), each name and value decoded once and re-encoded strictly, joined with `&`.
 * Two spellings of one query (order, `%7E` vs `~`, `+` vs `%20`) sign the same.
 */
export function canonicalSigningQuery(query: QueryInput): string {
  return pairs(query)
    .filter(([name]) => name !== signatureParam)
    .sort((a, b) => byCodeUnits(a[0], b[0]) || byCodeUnits(a[1], b[1]))
    .map(([name, value]) => `${encodeStrict(name)}=${encodeStrict(value)}`)
    .join('&');
}

/**
 * The path as signed: each segment decoded once and re-encoded strictly, so `%7E` and `~`
 * agree but `a%2Fb` (one segment) and `a/b` (two) stay different. Undefined when a segment
 * is not valid percent-encoding.
 */
export function canonicalSigningPath(path: string): string | undefined {
  try {
    return path
      .split('/')
      .map((segment) => encodeStrict(decodeURIComponent(segment)))
      .join('/');
  } catch {
    return undefined;
  }
}

function digest(key: string, path: string, query: string): Buffer {
  // A newline cannot occur in either encoded part, so path and query cannot run together.
  return createHmac('sha256', key).update(`${path}\n${query}`).digest();
}

/**
 * Signs `path` (as it appears in the URL, e.g. "/v1/renditions/fabric/weave.png") with
 * `query`, and returns the URL path with the canonical query and the signature appended.
 */
export function signUrl(path: string, query: QueryInput, key: string): string {
  if (key.length === 0) throw new RangeError('signing key must not be empty');
  const canonicalPath = canonicalSigningPath(path);
  if (canonicalPath === undefined) throw new RangeError(`path is not valid percent-encoding: ${path}`);
  const canonicalQuery = canonicalSigningQuery(query);
  const signature = digest(key, canonicalPath, canonicalQuery).toString('base64url');
  const sep = canonicalQuery ? `${canonicalQuery}&` : '';
  return `${canonicalPath}?${sep}${signatureParam}=${signature}`;
}

export type SignatureCheck = 'valid' | 'missing' | 'invalid';

/** Decodes a base64url signature of exactly 32 bytes; undefined for anything else. */
function decodeSignature(text: string): Buffer | undefined {
  if (!/^[A-Za-z0-9_-]{43}$/.test(text)) return undefined;
  const bytes = Buffer.from(text, 'base64url');
  return bytes.length === 32 ? bytes : undefined;
}

/**
 * Checks the `signature` parameter of a request against every key. Comparison is
 * constant-time per key (timingSafeEqual over equal-length buffers); a repeated or
 * malformed signature is `invalid`, an absent one `missing`.
 */
export function verifySignature(path: string, query: QueryInput, keys: readonly string[]): SignatureCheck {
  const given = pairs(query).filter(([name]) => name === signatureParam);
  if (given.length === 0) return 'missing';
  const supplied = given.length === 1 ? decodeSignature(given[0][1]) : undefined;
  const canonicalPath = canonicalSigningPath(path);
  if (!supplied || canonicalPath === undefined) return 'invalid';
  const canonicalQuery = canonicalSigningQuery(query);
  let ok = false;
  for (const key of keys) {
    // Check every key even after a match, so timing does not say which key signed.
    if (timingSafeEqual(digest(key, canonicalPath, canonicalQuery), supplied)) ok = true;
  }
  return ok ? 'valid' : 'invalid';
}

/**
 * The one rule for whether unsigned requests are refused: `signing.required` when set, else
 * required whenever a key is configured.
 */
export function signingRequired(signing: { keys: readonly string[]; required?: boolean }): boolean {
  return signing.required ?? signing.keys.length > 0;
}

function splitUrl(url: string): { path: string; query: URLSearchParams } {
  const q = url.indexOf('?');
  return q < 0 ? { path: url, query: new URLSearchParams() } : { path: url.slice(0, q), query: new URLSearchParams(url.slice(q + 1)) };
}

/**
 * The one signature check of a raw request URL: true when validly signed; a present but wrong
 * signature is refused even when signing is optional; a missing one only when `required`.
 * `unsignedDetail` is the 403 detail for a missing signature.
 */
export function checkSignedUrl(url: string, keys: string[], required: boolean, unsignedDetail: string): boolean {
  const { path, query } = splitUrl(url);
  const check = verifySignature(path, query, keys);
  if (check === 'invalid') throw new FoldwiseError('ERR_SIGNATURE_INVALID', 'The signature does not match this path and query.');
  if (check === 'missing' && required) throw new FoldwiseError('ERR_SIGNATURE_REQUIRED', unsignedDetail);
  return check === 'valid';
}
