import { FoldwiseError } from '../../errors.js';

/**
 * The source path of a request URL under `prefix`, decoded once, refused when it could leave
 * the origin root or mean two things: encoded slashes or backslashes (%2f, %5c), NUL, `.`/`..`
 * segments (also when percent-encoded), empty segments, or bad percent-encoding. The folder
 * origin checks again on the real file system (symlinks); this is the HTTP-side gate.
 */
export function sourcePathOf(url: string, prefix: string): string {
  const raw = url.split('?')[0].slice(prefix.length);
  const refuse = (why: string) => new FoldwiseError('ERR_SOURCE_PATH_INVALID', `source path refused: ${why}`);
  if (raw.length === 0) throw refuse('empty');
  if (/%(2f|5c|00)/i.test(raw) || raw.includes('\\')) throw refuse('encoded slash, backslash or NUL');
  const segments = raw.split('/').map((s) => {
    try {
      return decodeURIComponent(s);
    } catch {
      throw refuse('bad percent-encoding');
    }
  });
  for (const s of segments) {
    if (s === '' || s === '.' || s === '..') throw refuse('empty, "." or ".." segment');
    if (s.includes('\0')) throw refuse('NUL');
  }
  return segments.join('/');
}
