/**
 * Exit codes of the command-line tool, and the errors that choose them.
 * 0 ok, 1 the work failed, 2 the command line was wrong (common practice for Unix tools).
 */
export const EXIT_OK = 0;
export const EXIT_FAILURE = 1;
export const EXIT_USAGE = 2;

/** The command line asks for something impossible; the message says what to change. */
export class UsageError extends Error {
  override name = 'UsageError';
}
