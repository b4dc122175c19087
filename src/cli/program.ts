/**
 * The `foldwise` command line: one commander program, one module per command.
 */
import { readFileSync } from 'node:fs';
import { Command } from 'commander';
import { registerCommands } from './commands/index.js';

/** Builds the program; `run` in index.ts parses argv with it and maps errors to exit codes. */
export function createProgram(): Command {
  const { version } = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  const program = new Command('foldwise')
    .description('Image renditions made correctly: render, analyse alias risk, pre-warm, serve.')
    .version(version)
    .showHelpAfterError('(add --help for usage)')
    .addHelpText('after', '\nExit codes: 0 done, 1 the work failed (the message names the error code), 2 a wrong command line.')
    .exitOverride()
    .configureOutput({ outputError: (text, write) => write(`foldwise: ${text.replace(/^error: /, '')}`) });
  registerCommands(program);
  for (const sub of program.commands) sub.exitOverride().showHelpAfterError(`(add --help for usage)`);
  return program;
}
