/**
 * The process shell: configuration from files and environment, demo pictures on first run,
 * listening, and graceful shutdown. Everything else is in app.ts (testable without a socket).
 */
import type { AddressInfo } from 'node:net';
import { resolve } from 'node:path';
import { build } from './app.js';
import { ConfigError, loadConfig } from './config.js';
import { warmStartPage } from './http/warm-start.js';
import { warmRenderPath } from './http/warm-path.js';
import { pageUrl, serverLogger } from './logging.js';
import { signingRequired } from './security/signing.js';
import { installShutdown } from './shutdown.js';

async function main(): Promise<void> {
  const config = loadConfig();
  config.origin.sourceDir = resolve(config.origin.sourceDir);
  config.cache.dir = resolve(config.cache.dir);
  if (config.origin.generateDemo) {
    // The demo generator lives in tools/demo, outside the server's tree: from the sources it is
    // loaded as it is, from a build as dist/demo/tools/demo (npm run build compiles it there, and
    // the CLI bundle bundles it there).
    const demo = new URL(import.meta.url.endsWith('.ts') ? '../tools/demo/index.ts' : './demo/tools/demo/index.js', import.meta.url);
    const { ensureDemoImages } = (await import(demo.href)) as { ensureDemoImages(dir: string): Promise<string[]> };
    await ensureDemoImages(config.origin.sourceDir);
  }
  const app = await build({ config, logger: serverLogger(config, process.stdout.isTTY === true) });
  const shutdown = installShutdown(app, { deadlineMs: config.shutdown.deadlineMs });
  await app.listen({ host: config.server.host, port: config.server.port });
  // /readyz says 503 until the render threads are warm and a picture went through the render path: so does this line.
  const warm = app.renderPool.warm().then(() => warmRenderPath(app));
  app.warmUp.hold(warm);
  try {
    await warm;
  } catch (error) {
    // A signal during the warm-up closes the pool under it: that is a shutdown, not a failed start.
    if (shutdown.begun()) return;
    throw error;
  }
  if (shutdown.begun()) return;
  const url = pageUrl(app.server.address() as AddressInfo);
  app.log.info({ url, sourceDir: config.origin.sourceDir, cacheDir: config.cache.dir }, `foldwise ready: open ${url} in a browser`);
  // The demo's start page shows every picture: render its tiles now, before a browser asks.
  if (config.origin.generateDemo && config.origin.listing && !signingRequired(config.signing)) void warmStartPage(app);
}

main().catch((error: unknown) => {
  if (error instanceof ConfigError) {
    process.stderr.write(`foldwise: ${error.message}\n`);
  } else {
    process.stderr.write(`foldwise: could not start: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
  }
  process.exit(1);
});
