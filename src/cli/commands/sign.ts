/**
 * `foldwise sign <url-path>`: prints the URL path with its signature, signed with the first
 * configured key (FOLDWISE_SIGNING_KEY or signing.keys), the same way the service verifies it.
 */
import type { Command } from 'commander';
import { UsageError } from '../exit.js';

export function registerSign(program: Command): void {
  program
    .command('sign')
    .description('sign a rendition URL path with the configured key')
    .argument('<url-path>', 'path and query, e.g. "/v1/renditions/fabric/weave.png?width=640"')
    .addHelpText('after', '\nThe key comes from FOLDWISE_SIGNING_KEY or signing.keys in the configuration.')
    .action(async (urlPath: string) => {
      if (!urlPath.startsWith('/')) throw new UsageError(`url-path must start with "/", got "${urlPath}"`);
      const { loadConfig } = await import('../../config.js');
      const { signUrl } = await import('../../security/signing.js');
      const url = new URL(urlPath, 'http://localhost');
      const [key] = loadConfig().signing.keys;
      if (!key) throw new Error('signing is off: set FOLDWISE_SIGNING_KEY (or signing.keys) to sign URLs');
      process.stdout.write(`${signUrl(url.pathname, url.searchParams, key)}\n`);
    });
}
