#!/usr/bin/env node
// The `foldwise` command. It runs the compiled CLI in dist/ (bundled at `prepare`, i.e. by
// `npm install` / `npm ci`: scripts/build-cli.mjs), which starts in a fraction of a second.
// It falls back to the TypeScript sources through tsx (a runtime dependency; seconds per
// command) when there is no compiled CLI, or in a clone whose src/ changed after the build,
// so an edit is never hidden behind a stale bundle (`npm run build:cli` makes it fast again).
import { existsSync, readdirSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const sourceDir = fileURLToPath(new URL('../src/', import.meta.url));
const source = new URL('../src/cli/index.ts', import.meta.url);
const compiled = new URL('../dist/cli/index.js', import.meta.url);

/** Newest modification time of the .ts files under `dir` (ms; 0 when there are none). */
function newestSource(dir) {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true, recursive: true })) {
    if (entry.isFile() && entry.name.endsWith('.ts')) {
      newest = Math.max(newest, statSync(`${entry.parentPath ?? entry.path}/${entry.name}`).mtimeMs);
    }
  }
  return newest;
}

const compiledFile = fileURLToPath(compiled);
const hasSource = existsSync(fileURLToPath(source));
const useCompiled = existsSync(compiledFile) && (!hasSource || statSync(compiledFile).mtimeMs >= newestSource(sourceDir));

let entry = compiled;
if (!useCompiled) {
  const { register } = await import('tsx/esm/api');
  register();
  entry = source;
}
const { run } = await import(entry.href);
const code = await run(process.argv.slice(2));
// Output to files and pipes is synchronous on Linux, so nothing is lost by exiting now; exiting
// also ends any pool or timer a command forgot to close.
process.exit(code);
