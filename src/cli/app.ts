/**
 * The service, built in-process for a command: the same app (plugins, pool, cache, ingest) the
 * server runs, without a socket. Commands call its functions directly and close it after.
 */
import { resolve } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { build } from '../app.js';
import { type Config, loadConfig } from '../config.js';
import { isFoldwiseError } from '../errors.js';
import { UsageError } from './exit.js';

export interface CommandApp {
  app: FastifyInstance;
  config: Config;
}

/**
 * Loads the configuration (files, then environment, as the server does), lets `adjust` change
 * it for the command, and builds the app quietly. Load shedding is off: a command is not a
 * server under load, and its own pool bound still applies.
 */
export async function openApp(adjust: (config: Config) => void): Promise<CommandApp> {
  const config = loadConfig();
  config.origin.sourceDir = resolve(config.origin.sourceDir);
  config.cache.dir = resolve(config.cache.dir);
  config.server.logLevel = 'silent';
  config.pressure = { ...config.pressure, maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0 };
  adjust(config);
  const app = await build({ config, logger: false });
  await app.ready();
  return { app, config };
}

/** Runs `work` with an app and always closes it (workers, cache tiers, Redis). */
export async function withApp<T>(adjust: (config: Config) => void, work: (c: CommandApp) => Promise<T>): Promise<T> {
  const opened = await openApp(adjust);
  try {
    return await work(opened);
  } finally {
    await opened.app.close();
  }
}

/** A refused parameter is the command line's fault: it becomes a usage error (exit 2). */
export function asUsage(e: unknown): unknown {
  return isFoldwiseError(e) && e.code.startsWith('ERR_PARAM_') ? new UsageError(e.message) : e;
}
