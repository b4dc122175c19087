/**
 * Hostile request URLs: path traversal in the encodings attackers use (RFC 3986 section 2.1
 * percent-encoding, double encoding, overlong UTF-8 per RFC 3629 section 3, backslashes,
 * NUL) and parameter abuse (huge, negative, NaN, exponent/hex spellings, repeated, unknown,
 * control characters). Each names the status and problem+json code it must get.
 */
export interface RequestCase {
  name: string;
  /** Path and query after /v1/renditions/. */
  url: string;
  status: number;
  code: string;
}

/** Traversal attempts aimed at `secret.png`, a valid image one folder above the source root. */
export const traversalCases: RequestCase[] = [
  ['plain ../', '../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['deeper a/../../', 'a/../../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['./../', './../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['percent-encoded dots %2e%2e/', '%2e%2e/secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['upper-case %2E%2E%2F', '%2E%2E%2Fsecret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['encoded slash ..%2f', '..%2fsecret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['encoded backslash ..%5c', '..%5csecret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['literal backslash ..\\', '..\\secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  // Decoded exactly once, leaving "%2e%2e", which the folder origin refuses as a name.
  ['double-encoded %252e%252e/', '%252e%252e/secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  // Not valid percent-encoded UTF-8 at all: refused by the router before any route runs.
  ['overlong UTF-8 dots %c0%ae', '%c0%ae%c0%ae/secret.png?width=8', 400, 'ERR_REQUEST_INVALID'],
  ['%u-style escapes', '%u002e%u002e/secret.png?width=8', 400, 'ERR_REQUEST_INVALID'],
  // U+FF0E FULLWIDTH FULL STOP is not ".", and no Unicode normalisation turns it into one.
  ['fullwidth dots', '%EF%BC%8E%EF%BC%8E/secret.png?width=8', 404, 'ERR_SOURCE_NOT_FOUND'],
  ['NUL before the name', '%00../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['NUL truncation', 'secret.png%00.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['leading empty segment', '/../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['Windows drive path', 'C:%5cWindows%5cwin.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  // Not a dot segment, but the folder origin refuses hidden (dot-led) names as well.
  ['four dots', '..../secret.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  ['symlink pointing out of the root', 'escape.png?width=8', 400, 'ERR_SOURCE_PATH_INVALID'],
  // Server-side request forgery through the upstream origin, which this app has switched off.
  ['upstream to the metadata address', '~upstream/169.254.169.254/latest/meta-data?width=8', 404, 'ERR_ORIGIN_DISABLED'],
  ['upstream to loopback', '~upstream/127.0.0.1:22/x.png?width=8', 404, 'ERR_ORIGIN_DISABLED'],
].map(([name, url, status, code]) => ({ name, url, status, code }) as RequestCase);

const manyParams = Array.from({ length: 500 }, (_, i) => `p${i}=1`).join('&');

/** Parameter abuse against a valid source, `grating.png`. */
export const parameterCases: RequestCase[] = [
  ['huge width', 'width=99999999999', 400, 'ERR_PARAM_INVALID'],
  ['width above maxDimension', 'width=8193', 400, 'ERR_PARAM_INVALID'],
  ['negative width', 'width=-1', 400, 'ERR_PARAM_INVALID'],
  ['zero width', 'width=0', 400, 'ERR_PARAM_INVALID'],
  ['NaN width', 'width=NaN', 400, 'ERR_PARAM_INVALID'],
  ['Infinity width', 'width=Infinity', 400, 'ERR_PARAM_INVALID'],
  ['exponent width', 'width=1e3', 400, 'ERR_PARAM_INVALID'],
  ['hex width', 'width=0x40', 400, 'ERR_PARAM_INVALID'],
  ['fractional width', 'width=32.5', 400, 'ERR_PARAM_INVALID'],
  ['empty width', 'width=', 400, 'ERR_PARAM_INVALID'],
  ['NUL in width', 'width=32%00', 400, 'ERR_PARAM_INVALID'],
  ['CR LF header injection in width', 'width=32%0d%0aX-Injected:%201', 400, 'ERR_PARAM_INVALID'],
  ['emoji width', 'width=%F0%9F%A7%B5', 400, 'ERR_PARAM_INVALID'],
  ['repeated width', 'width=32&width=64', 400, 'ERR_PARAM_REPEATED'],
  ['unknown parameter', 'width=32&colour=red', 400, 'ERR_PARAM_UNKNOWN'],
  ['500 unknown parameters', `width=32&${manyParams}`, 400, 'ERR_PARAM_UNKNOWN'],
  ['no size at all', 'format=png', 400, 'ERR_PARAM_MISSING'],
  ['density zero', 'width=32&density=0', 400, 'ERR_PARAM_INVALID'],
  ['density huge', 'width=32&density=1e308', 400, 'ERR_PARAM_INVALID'],
  ['negative density', 'width=32&density=-2', 400, 'ERR_PARAM_INVALID'],
  ['quality 101', 'width=32&quality=101', 400, 'ERR_PARAM_INVALID'],
  ['negative prefilter', 'width=32&prefilter=-1', 400, 'ERR_PARAM_INVALID'],
  ['NaN prefilter', 'width=32&prefilter=NaN', 400, 'ERR_PARAM_INVALID'],
  ['kernel with a path', 'width=32&kernel=..%2F..%2Fetc', 400, 'ERR_PARAM_INVALID'],
  ['format svg', 'width=32&format=svg', 400, 'ERR_PARAM_INVALID'],
  ['background as a URL', 'width=32&background=url(http://127.0.0.1/)', 400, 'ERR_PARAM_INVALID'],
  ['script in position', 'width=32&position=%3Cscript%3E', 400, 'ERR_PARAM_INVALID'],
  ['very long position', `width=32&position=${'left%20'.repeat(200)}`, 400, 'ERR_PARAM_INVALID'],
  ['NUL in fit', 'width=32&fit=contain%00', 400, 'ERR_PARAM_INVALID'],
  ['output pixels over the limit', 'width=8192&height=8192', 422, 'ERR_OUTPUT_TOO_LARGE'],
  ['density pushes a side past maxDimension', 'width=8000&density=4&fit=fill&height=1', 422, 'ERR_LIMIT_OUTPUT_DIMENSION'],
].map(([name, query, status, code]) => ({ name, url: `grating.png?${query}`, status, code }) as RequestCase);
