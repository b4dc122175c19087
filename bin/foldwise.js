#!/usr/bin/env node
// The `foldwise` command. From a clone (src/ present) it runs the TypeScript sources through
// tsx, a runtime dependency; a build without sources runs the compiled dist/ instead.
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const source = new URL('../src/cli/index.ts', import.meta.url);
const compiled = new URL('../dist/cli/index.js', import.meta.url);

let entry = compiled;
if (existsSync(fileURLToPath(source))) {
  const { register } = await import('tsx/esm/api');
  register();
  entry = source;
}
const { run } = await import(entry.href);
const code = await run(process.argv.slice(2));
// Output to files and pipes is synchronous on Linux, so nothing is lost by exiting now; exiting
// also ends any pool or timer a command forgot to close.
process.exit(code);
