import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/**
 * Writes a FOLDWISE_CONFIG override file for a load-run server: sources from `sourceDir`,
 * request logs off (they would dominate a throughput figure), a private disk cache folder.
 */
export function loadConfigFile(sourceDir: string, extra: Record<string, unknown> = {}): string {
  const dir = mkdtempSync(join(tmpdir(), 'foldwise-load-'));
  const file = join(dir, 'config.json');
  const config = {
    server: { logLevel: 'warn' },
    origin: { sourceDir, generateDemo: false },
    cache: { dir: join(dir, 'cache') },
    ...extra,
  };
  writeFileSync(file, JSON.stringify(config, null, 2));
  return file;
}
