/**
 * `foldwise sign <url>`: prints the URL (a full http(s) URL or a path) with its signature, signed with the first
 * configured key (FOLDWISE_SIGNING_KEY or signing.keys), the same way the service verifies it.
 * For an ingest URL, --upload adds the file's SHA-256 as `digest` and --source adds `source`,
 * so the signature binds the one body the URL may ingest.
 */
import { readFile } from 'node:fs/promises';
import type { Command } from 'commander';
import { UsageError } from '../exit.js';

interface SignOptions {
  upload?: string;
  source?: string;
}

export function registerSign(program: Command): void {
  program
    .command('sign')
    .description('sign a rendition, alias-risk, listing or ingest URL with the configured key')
    .argument('<url>', 'a full URL as copied ("http://127.0.0.1:8080/v1/renditions/fabric/weave.png?width=640") or its path and query')
    .option('--upload <file>', 'ingest: bind the URL to this file (adds digest=<its SHA-256 hex>)')
    .option('--source <path>', 'ingest: bind the URL to this source in the origin (adds source=<path>)')
    .addHelpText(
      'after',
      [
        '',
        'The key comes from FOLDWISE_SIGNING_KEY or signing.keys in the configuration: at least 16',
        'characters each (32 random bytes, e.g. `openssl rand -base64 32`, is a good key); a comma',
        'list rotates keys: the first signs, every one verifies. A full URL is printed back whole,',
        'a path as a path. Exit codes: 0 signed, 1 signing is off or failed, 2 a wrong command line.',
        'A signature covers the path and every query parameter, nothing else. An ingest URL must',
        'name its body, or the service refuses it (403 ERR_INGEST_UNBOUND):',
        '  foldwise sign "/v1/ingest?widths=320,640" --upload scarf.png',
        '  foldwise sign "/v1/ingest?widths=320,640" --source fabrics/twill.jpg',
      ].join('\n'),
    )
    .action(async (given: string, options: SignOptions) => {
      const full = /^https?:\/\//i.test(given);
      if (!full && !given.startsWith('/')) throw new UsageError(`give a full http(s) URL or a path starting with "/", got "${given}"`);
      if (options.upload !== undefined && options.source !== undefined) {
        throw new UsageError('give --upload or --source, not both: an ingest URL names one body');
      }
      const { loadConfig } = await import('../../config.js');
      const { signUrl } = await import('../../security/signing.js');
      const { digestOf } = await import('../../ingest/store.js');
      let url: URL;
      try {
        url = new URL(given, 'http://localhost');
      } catch {
        throw new UsageError(`not a URL: "${given}"`);
      }
      if (options.upload !== undefined) url.searchParams.set('digest', digestOf(await readFile(options.upload)));
      if (options.source !== undefined) url.searchParams.set('source', options.source);
      const [key] = loadConfig().signing.keys;
      if (!key) throw new Error('signing is off: set FOLDWISE_SIGNING_KEY (or signing.keys) to sign URLs');
      process.stdout.write(`${full ? url.origin : ''}${signUrl(url.pathname, url.searchParams, key)}\n`);
    });
}
