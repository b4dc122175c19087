/**
 * `foldwise serve`: the server, exactly as `npm start` runs it (src/server.ts), with a few
 * settings from flags. It runs until SIGINT or SIGTERM; the server's shutdown ends the process.
 */
import type { Command } from 'commander';
import { portNumber } from '../options.js';

interface ServeOptions {
  host?: string;
  port?: number;
  sources?: string;
}

export function registerServe(program: Command): void {
  program
    .command('serve')
    .description('run the HTTP service (the same as npm start)')
    .option('--host <address>', 'listen address (env HOST)')
    .option('--port <n>', 'listen port (env PORT); 0 picks a free one', portNumber)
    .option('--sources <folder>', 'folder origin root (env FOLDWISE_SOURCE_DIR)')
    .action(async (o: ServeOptions) => {
      // Flags become the environment variables the server already reads (src/config/).
      if (o.host) process.env.HOST = o.host;
      if (o.port !== undefined) process.env.PORT = String(o.port);
      if (o.sources) process.env.FOLDWISE_SOURCE_DIR = o.sources;
      await import('../../server.js');
      await new Promise<never>(() => {
        // Never settles: the listening socket keeps the process alive until shutdown exits it.
      });
    });
}
