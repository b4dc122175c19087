/**
 * Applies tools/reorg/moves.json (issue 16, one home per concept) to this work tree:
 *   npx tsx tools/reorg/apply.ts [--dry-run]
 * 1. works out where every tracked file goes (the map; files it does not list follow the folder
 *    rules and are printed), 2. rewrites, with the TypeScript parser, every relative specifier
 *    and path string in src/ test/ scripts/ load/ bin/ tools/ and vitest.config.ts, the path
 *    tokens of the build and CI files and the full file paths in Markdown, 3. `git mv`s the
 *    files and writes the rewritten texts, 4. runs the demo steps (demo-steps.ts) and writes
 *    tools/reorg/applied.json, whose presence makes a second run refuse.
 * It refuses a dirty work tree. Nothing is committed: review, typecheck, test, then commit.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { makeMover, type MoveMap } from './paths.js';
import { movedFilePattern, rewriteSource, type Note } from './rewrite.js';
import { configFiles, rewriteConfigText, rewriteMarkdown } from './config-files.js';
import { demoSteps } from './demo-steps.js';

const started = performance.now();
const dryRun = process.argv.includes('--dry-run');
const root = fileURLToPath(new URL('../..', import.meta.url));
const marker = 'tools/reorg/applied.json';
const git = (...args: string[]) => execFileSync('git', args, { cwd: root, encoding: 'utf8' });
const fail = (message: string): never => {
  process.stderr.write(`reorg: ${message}\n`);
  process.exit(1);
};

if (existsSync(join(root, marker))) fail(`${marker} exists: the moves were applied already; refusing to run twice`);
if (!dryRun && git('status', '--porcelain', '--untracked-files=no').trim() !== '') fail('the work tree has uncommitted changes; commit or stash them first');

const map = JSON.parse(readFileSync(join(root, 'tools/reorg/moves.json'), 'utf8')) as MoveMap;
const tracked = git('ls-files', '-z').split('\0').filter((p) => p !== '');
const mover = makeMover(map, tracked);
const moves = tracked.filter((p) => mover.file(p) !== p).map((p) => [p, mover.file(p)] as const);

const listedMoves = Object.entries(map.files).filter(([from, to]) => from !== to);
if (listedMoves.length > 0 && listedMoves.every(([from, to]) => !existsSync(join(root, from)) && existsSync(join(root, to)))) {
  fail('every moved file is already at its new path; refusing to run twice');
}
const staying = new Set(tracked.filter((p) => mover.file(p) === p));
const seen = new Map<string, string>();
for (const [from, to] of moves) {
  if (staying.has(to)) fail(`${from} -> ${to}: a file that stays is there`);
  const twice = seen.get(to);
  if (twice !== undefined) fail(`${from} and ${twice} both move to ${to}`);
  seen.set(to, from);
}

const codeRoots = /^(src|test|scripts|load|bin|tools)\//;
const isCode = (p: string) => (codeRoots.test(p) || p === 'vitest.config.ts') && !p.startsWith('tools/reorg/') && /\.(ts|mts|cts|tsx|js|mjs|cjs)$/.test(p);
const isMarkdown = (p: string) => p.endsWith('.md') && !p.startsWith('tools/reorg/') && !p.startsWith('node_modules/');
const filePattern = movedFilePattern(mover);
const texts = new Map<string, string>();
const report: { file: string; notes: Note[] }[] = [];
for (const from of tracked) {
  const to = mover.file(from);
  let result: { text: string; notes: Note[] } | undefined;
  const text = () => readFileSync(join(root, from), 'utf8');
  if (isCode(from)) result = rewriteSource(from, to, text(), mover, filePattern);
  else if (configFiles.includes(from)) result = rewriteConfigText(text(), mover);
  else if (isMarkdown(from)) result = rewriteMarkdown(text(), mover, filePattern);
  if (result === undefined || result.notes.length === 0) continue;
  if (result.notes.some((n) => n.kind !== 'left' && n.kind !== 'unresolved')) texts.set(to, result.text);
  report.push({ file: to, notes: result.notes });
}

const print = (line: string) => process.stdout.write(`${line}\n`);
print(`${moves.length} files move, ${tracked.length - moves.length} stay`);
for (const p of mover.gone) print(`  listed but not tracked (deleted or renamed elsewhere?): ${p}`);
for (const [p, to] of mover.unlisted) print(`  not in the map, placed by folder rule: ${p} -> ${to}${p === to ? ' (stays)' : ''}`);
const count = (k: Note['kind']) => report.reduce((n, r) => n + r.notes.filter((x) => x.kind === k).length, 0);
print(`rewrites: ${count('import')} module specifiers, ${count('string')} relative path strings, ${count('repo-path')} repository paths, ${count('comment')} paths in comments and Markdown, in ${report.length} files`);
for (const r of report) {
  for (const n of r.notes) if (n.kind === 'string' || n.kind === 'repo-path') print(`  ${n.kind.padEnd(10)} ${r.file}:${n.line}  ${n.from} -> ${n.to}`);
}
for (const r of report) for (const n of r.notes) if (n.kind === 'unresolved') print(`  UNRESOLVED ${r.file}:${n.line} ${n.from}`);
for (const r of report) for (const n of r.notes) if (n.kind === 'left') print(`  left as is (relative-looking, not a path from this file): ${r.file}:${n.line} '${n.from}'`);

const read = (p: string) => texts.get(p) ?? readFileSync(join(root, [...moves].find(([, to]) => to === p)?.[0] ?? p), 'utf8');
if (dryRun) {
  for (const s of demoSteps(root, read, false)) print(`  demo step ${s.done ? 'would do' : 'FAILS'}: ${s.file}: ${s.what}`);
  print(`dry run: nothing changed (${((performance.now() - started) / 1000).toFixed(1)} s)`);
  process.exit(0);
}

for (const [from, to] of moves) {
  mkdirSync(dirname(join(root, to)), { recursive: true });
  git('mv', from, to);
}
for (const [p, text] of texts) writeFileSync(join(root, p), text);
const steps = demoSteps(root, read, true);
for (const s of steps) print(`  demo step ${s.done ? 'done' : 'NOT DONE'}: ${s.file}: ${s.what}`);
writeFileSync(join(root, marker), `${JSON.stringify({ applied: new Date().toISOString(), from: git('rev-parse', 'HEAD').trim(), moves: Object.fromEntries(moves) }, null, 2)}\n`);
git('add', '-u');
git('add', marker, 'tools/demo/tsconfig.build.json');
print(`applied in ${((performance.now() - started) / 1000).toFixed(1)} s; now: npm run typecheck, the tests, then commit`);
