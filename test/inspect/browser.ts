import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

/** Debian's chromium; .ci/run installs it. */
export const chromiumPath = '/usr/bin/chromium';

/** Why the browser tests are skipped, or undefined when they can run. Printed once. */
export const browserSkipReason = existsSync(chromiumPath)
  ? undefined
  : `${chromiumPath} not found: inspector browser tests skipped (apt-get install chromium; .ci/run does it)`;
if (browserSkipReason) console.warn(browserSkipReason);

/**
 * Headless chromium with everything that would reach beyond loopback switched off: no
 * component updates, no sync, no background networking, no QUIC probes.
 */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: chromiumPath,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}
