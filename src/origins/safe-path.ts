import { FoldwiseError } from '../errors.js';

/** Longest source path accepted, in characters (common practice for URL path segments). */
const maxPathLength = 1024;

/**
 * Checks a source path from a request before it touches the file system, and returns it
 * as relative POSIX segments. Refused (ERR_SOURCE_PATH_INVALID):
 * - absolute paths (`/x`, `C:x`, `\\server`), backslashes, NUL and other control characters;
 * - `.` and `..` segments, empty segments, and hidden names (a leading dot);
 * - any percent escape: the router has already decoded the path once, so a `%2e%2e` or
 *   `%2f` still present is an attempt at double decoding.
 * The folder origin still resolves symlinks and checks the real path against its root.
 */
export function safeRelativePath(path: string): string[] {
  const refuse = (why: string): never => {
    throw new FoldwiseError('ERR_SOURCE_PATH_INVALID', `Source path refused: ${why}.`);
  };
  if (typeof path !== 'string' || path.length === 0) refuse('empty');
  if (path.length > maxPathLength) refuse(`longer than ${maxPathLength} characters`);
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(path)) refuse('control character');
  if (path.includes('\\')) refuse('backslash');
  if (/%[0-9a-f]{2}/i.test(path)) refuse('percent escape');
  if (path.startsWith('/') || /^[a-z]:/i.test(path)) refuse('absolute path');
  const segments = path.split('/');
  for (const s of segments) {
    if (s === '' || s === '.' || s === '..') refuse('empty, "." or ".." segment');
    if (s.startsWith('.')) refuse('hidden name');
  }
  return segments;
}
