import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { build as buildApp, type BuildOptions } from '../../src/app.js';
import { type Config, deepMerge, resolveConfig } from '../../src/config.js';

export interface TestApp {
  app: FastifyInstance;
  config: Config;
  /** The folder origin's root (empty unless the test writes sources into it). */
  sourceDir: string;
  cacheDir: string;
  /** Closes the app and removes its folders. */
  close(): Promise<void>;
}

export interface TestAppOptions extends Omit<BuildOptions, 'config'> {
  /** Config overrides merged over the test defaults. */
  config?: Record<string, unknown>;
  /** Use this source folder instead of a fresh empty one (it is not removed). */
  sourceDir?: string;
}

/**
 * The one way tests build the service: default config, quiet logs, one worker thread, fresh
 * temporary source and cache folders. Use app.inject() on the result; call close() after.
 */
export async function build(options: TestAppOptions = {}): Promise<TestApp> {
  const own = await mkdtemp(join(tmpdir(), 'fw-test-'));
  const sourceDir = options.sourceDir ?? join(own, 'sources');
  const cacheDir = join(own, 'cache');
  if (!options.sourceDir) await import('node:fs/promises').then((fs) => fs.mkdir(sourceDir));
  const config = resolveConfig(
    deepMerge(
      {
        server: { logLevel: 'silent' },
        origin: { sourceDir, generateDemo: false },
        pool: { threads: 1, maxQueue: 8 },
        // Ask the origin every time, so tests that change a source see it at once
        // (the identity and source memos and the kept decodes have their own tests).
        cache: { dir: cacheDir, identityTtlMs: 0, sourceBytes: 0, decodedBytes: 0 },
        // Load shedding off unless a test turns it on: a busy CI machine's event-loop stalls
        // must not turn into random 503s in tests about something else.
        pressure: { maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0 },
      },
      options.config ?? {},
    ),
  );
  const { config: _drop, sourceDir: _s, ...rest } = options;
  const app = await buildApp({ ...rest, config });
  await app.ready();
  // As server.ts does before it says ready (and /readyz answers 200).
  await app.renderPool.warm();
  return {
    app,
    config,
    sourceDir,
    cacheDir,
    async close() {
      await app.close();
      await rm(own, { recursive: true, force: true });
    },
  };
}
