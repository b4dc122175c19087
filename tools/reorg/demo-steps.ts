/**
 * The edits that moving the demo generator out of src/ needs beyond respelt paths. The server
 * (npm start, `foldwise serve`, the Docker image) still makes the demo pictures on first run:
 * from the sources it loads tools/demo/index.ts, from a build dist/demo/index.js, which the
 * build now compiles from tools/demo with its own tsconfig (the server's build keeps rootDir
 * src). Each step finds its exact text or reports that it must be done by hand.
 */
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export interface Step { file: string; done: boolean; what: string }

const demoImport = "const { ensureDemoImages } = await import('../tools/demo/index.js');";
const demoLoader = [
  '// The demo generator lives in tools/demo, outside the server\'s tree: from the sources it is',
  '    // loaded as it is, from a build as dist/demo (npm run build compiles it there).',
  "    const demo = new URL(import.meta.url.endsWith('.ts') ? '../tools/demo/index.ts' : './demo/index.js', import.meta.url);",
  '    const { ensureDemoImages } = (await import(demo.href)) as { ensureDemoImages(dir: string): Promise<string[]> };',
].join('\n');

const demoTsconfig = `${JSON.stringify(
  {
    '//': 'The demo picture generator, compiled beside the server (dist/demo) so a build can make the demo pictures too.',
    extends: '../../tsconfig.json',
    compilerOptions: { rootDir: '.', outDir: '../../dist/demo', sourceMap: false },
    include: ['./*.ts'],
  },
  null,
  2,
)}\n`;

/** Reads a file as it is after the moves (in a dry run: as the moves would leave it). */
export type Read = (file: string) => string;

function edit(root: string, read: Read, file: string, what: string, change: (text: string) => string | undefined, write: boolean): Step {
  const path = join(root, file);
  const text = read(file);
  const next = change(text);
  if (next === undefined) return { file, done: false, what: `${what}: text not found, do it by hand` };
  if (write) writeFileSync(path, next);
  return { file, done: true, what };
}

export function demoSteps(root: string, read: Read, write: boolean): Step[] {
  if (write && !existsSync(join(root, 'tools/demo/index.ts'))) return [{ file: 'tools/demo', done: false, what: 'tools/demo/index.ts missing: demo steps skipped' }];
  const steps: Step[] = [];
  steps.push(edit(root, read, 'src/server.ts', 'server loads the demo from tools/demo or dist/demo', (t) => (t.includes(demoImport) ? t.replace(demoImport, demoLoader) : undefined), write));
  steps.push(edit(root, read, 'tsconfig.json', 'typecheck includes tools/', (t) => {
    const m = /"include": \[([^\]]*)\]/.exec(t);
    if (!m) return undefined;
    return m[1].includes('"tools"') ? t : t.replace(m[0], `"include": [${m[1]}, "tools"]`);
  }, write));
  steps.push(edit(root, read, 'package.json', 'build compiles tools/demo to dist/demo', (t) => {
    const build = '"build": "tsc -p tsconfig.build.json"';
    return t.includes(build) ? t.replace(build, '"build": "tsc -p tsconfig.build.json && tsc -p tools/demo/tsconfig.build.json"') : undefined;
  }, write));
  steps.push(edit(root, read, 'Dockerfile', 'image build copies tools/demo', (t) => {
    const copy = 'COPY src ./src\n';
    return t.includes(copy) ? t.replace(copy, `${copy}COPY tools/demo ./tools/demo\n`) : undefined;
  }, write));
  if (write) writeFileSync(join(root, 'tools/demo/tsconfig.build.json'), demoTsconfig);
  steps.push({ file: 'tools/demo/tsconfig.build.json', done: true, what: 'created' });
  return steps;
}
