/**
 * Bundles the `foldwise` command and the render worker into compiled JavaScript, so the bin
 * starts without compiling TypeScript (tsx took seconds per command). Runs at `prepare`, that
 * is on every `npm install` / `npm ci` in a clone; plain JavaScript so it needs no tsx.
 *
 *   dist/cli/index.js   the CLI (bin/foldwise.js runs it when it is not older than src/), and
 *                       beside it the chunks each command loads when it runs
 *   dist/pool/worker.js the piscina worker entry, where src/pool/render-pool.ts looks for it
 *   dist/inspector/client.js  the /inspect page's browser script (scripts/bundle-inspector.mjs)
 *
 * Packages stay external (sharp is native; the rest load from node_modules as usual). The
 * layout is the one `npm run build` (tsc) writes, and each module's `import.meta.url` is
 * rewritten to the URL its file has in that layout, so paths relative to a module (the
 * worker, config/default.json, package.json, the inspector page) resolve as they do there.
 */
import { build } from 'esbuild';
import { readFile } from 'node:fs/promises';
import { dirname, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { bundleInspector } from './bundle-inspector.mjs';

const root = dirname(dirname(fileURLToPath(import.meta.url)));
const src = `${root}/src`;

/** `import.meta.url` of a bundled module -> the URL of its .js file in dist/, relative to the bundle. */
const tscLayoutUrls = (bundleDir) => ({
  name: 'tsc-layout-import-meta-url',
  setup(b) {
    b.onLoad({ filter: /\/src\/.*\.ts$/ }, async (args) => {
      const code = await readFile(args.path, 'utf8');
      if (!code.includes('import.meta.url')) return undefined;
      const asJs = relative(bundleDir, args.path.replace(src, `${root}/dist`)).replace(/\.ts$/, '.js');
      const url = `new URL(${JSON.stringify(asJs)}, import.meta.url).href`;
      return { contents: code.replaceAll('import.meta.url', url), loader: 'ts' };
    });
  },
});

const common = {
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  packages: 'external',
  logLevel: 'warning',
};

await Promise.all([
  // Split at the CLI's dynamic imports, so `--help` loads neither fastify nor sharp: each
  // command's modules (and the packages they import) load when that command runs.
  build({ ...common, entryPoints: [`${src}/cli/index.ts`], outdir: `${root}/dist/cli`, splitting: true, chunkNames: '[name]-[hash]', plugins: [tscLayoutUrls(`${root}/dist/cli`)] }),
  build({ ...common, entryPoints: [`${src}/pool/worker.ts`], outfile: `${root}/dist/pool/worker.js`, plugins: [tscLayoutUrls(`${root}/dist/pool`)] }),
  // The demo generator, where the server looks for it in a build (src/server.ts), for `foldwise serve`.
  build({ ...common, entryPoints: [`${root}/tools/demo/index.ts`], outfile: `${root}/dist/demo/tools/demo/index.js` }),
  bundleInspector(root),
]);
