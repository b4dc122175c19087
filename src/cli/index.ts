/**
 * The `foldwise` command line's public surface: bin/foldwise.js calls `run` and exits with
 * its code (0 ok, 1 failure, 2 usage error). Long-running commands (serve) resolve at shutdown.
 */
import { CommanderError } from 'commander';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, UsageError } from './exit.js';
import { createProgram } from './program.js';

/** Runs the command line and resolves with the exit code (the caller sets process.exitCode). */
export async function run(argv: readonly string[]): Promise<number> {
  const program = createProgram();
  try {
    await program.parseAsync([...argv], { from: 'user' });
    return EXIT_OK;
  } catch (e) {
    if (e instanceof CommanderError) {
      // Help and version "errors" carry exit code 0; everything else commander raises is usage.
      return e.exitCode === 0 ? EXIT_OK : EXIT_USAGE;
    }
    if (e instanceof UsageError) {
      process.stderr.write(`foldwise: ${e.message}\n(add --help for usage)\n`);
      return EXIT_USAGE;
    }
    process.stderr.write(`foldwise: ${describe(e)}\n`);
    return EXIT_FAILURE;
  }
}

function describe(e: unknown): string {
  if (e instanceof Error) {
    const code = (e as { code?: unknown }).code;
    return typeof code === 'string' && code.startsWith('ERR_') ? `${e.message} (${code})` : e.message;
  }
  return String(e);
}
