/**
 * Bundles the inspector's browser script, src/inspector/client.ts, into dist/inspector/client.js
 * (esbuild: one ES module for the browser, ES2022). Runs at build time: `npm run build` and
 * `prepare` (scripts/build-cli.mjs) call it, so the service never compiles at request time; run
 * from the sources, src/http/routes/inspect.ts calls it at start when the bundle is missing or
 * older than src/inspector/. Plain JavaScript, so it needs no tsx; `node scripts/bundle-inspector.mjs`
 * runs it alone.
 */
import { build } from 'esbuild';
import { dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

/** Writes `dist/inspector/client.js` under `root` (paths in the bundle's comments are relative to it). */
export async function bundleInspector(root) {
  await build({
    absWorkingDir: root,
    entryPoints: ['src/inspector/client.ts'],
    outfile: 'dist/inspector/client.js',
    bundle: true,
    format: 'esm',
    platform: 'browser',
    target: ['es2022'],
    legalComments: 'none',
    logLevel: 'warning',
  });
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await bundleInspector(dirname(dirname(fileURLToPath(import.meta.url))));
}
