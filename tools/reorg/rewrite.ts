/**
 * Rewrites one TypeScript or JavaScript file for the moves, with the compiler's parser (never a
 * regex over the code): every string literal that is a relative path naming a tracked file or
 * folder (import, export, import(), import types, vi.mock, new URL(…, import.meta.url) and any
 * other) is respelt from the file's new place to the target's new place; string literals that
 * are repository paths (`src/…`, globs) follow the folder rules; comments and messages that
 * name a moved file by its full path (`src/render/key.ts`) name its new path.
 */
import ts from 'typescript';
import { foldersOf, resolveRelative, respell, type Mover } from './paths.js';

export interface Edit { start: number; end: number; text: string }
export interface Note { line: number; from: string; to: string; kind: 'import' | 'string' | 'repo-path' | 'comment' | 'unresolved' | 'left' }

const repoRoots = /^(src|test|scripts|load|bin|tools)\//;

function isModuleSpecifier(node: ts.Node): boolean {
  const p = node.parent;
  if (ts.isImportDeclaration(p) || ts.isExportDeclaration(p)) return p.moduleSpecifier === node;
  if (ts.isExternalModuleReference(p)) return true;
  if (ts.isLiteralTypeNode(p) && ts.isImportTypeNode(p.parent)) return true;
  if (ts.isCallExpression(p) && p.arguments[0] === node) {
    const callee = p.expression;
    if (callee.kind === ts.SyntaxKind.ImportKeyword) return true;
    if (ts.isIdentifier(callee) && callee.text === 'require') return true;
    if (ts.isPropertyAccessExpression(callee) && ts.isIdentifier(callee.expression) && callee.expression.text === 'vi') return true;
  }
  return false;
}

const isImportMetaUrl = (n: ts.Node) =>
  ts.isPropertyAccessExpression(n) && n.name.text === 'url' && ts.isMetaProperty(n.expression);
const isHere = (n: ts.Node) =>
  (ts.isIdentifier(n) && (n.text === '__dirname' || n.text === '__filename')) ||
  (ts.isPropertyAccessExpression(n) && (n.name.text === 'dirname' || n.name.text === 'filename') && ts.isMetaProperty(n.expression));

/**
 * A relative string that is a path from this file: the first argument of
 * `new URL(x, import.meta.url)` (also through `c ? x : y`), or an argument of a call such as
 * `join(import.meta.dirname, x)`. Other relative-looking strings (test labels, URLs) stay.
 */
function isFilePathString(node: ts.Node): boolean {
  let n: ts.Node = node;
  while (ts.isParenthesizedExpression(n.parent) || (ts.isConditionalExpression(n.parent) && n.parent.condition !== n)) n = n.parent;
  const p = n.parent;
  if (ts.isNewExpression(p) && ts.isIdentifier(p.expression) && p.expression.text === 'URL') {
    return p.arguments?.[0] === n && p.arguments[1] !== undefined && isImportMetaUrl(p.arguments[1]);
  }
  return ts.isCallExpression(p) && p.arguments.some((a) => isHere(a));
}

/** A repository path (or glob) whose fixed part is a moved file or folder, respelt. */
export function respellRepoPath(text: string, mover: Mover): string | undefined {
  if (!repoRoots.test(text)) return undefined;
  if (mover.tracked.has(text)) return mover.file(text) === text ? undefined : mover.file(text);
  const star = text.search(/[*{[]/);
  const fixed = (star < 0 ? text : text.slice(0, star)).replace(/\/+$/, '');
  const dir = star < 0 ? fixed : fixed.slice(0, fixed.lastIndexOf('/') + 1).replace(/\/+$/, '');
  if (!dir || !foldersOf(mover.tracked).has(dir)) return undefined;
  const moved = mover.folder(dir);
  return moved === dir ? undefined : moved + text.slice(dir.length);
}

export function movedFilePattern(mover: Mover): RegExp | undefined {
  const moved = [...mover.tracked].filter((p) => mover.file(p) !== p && repoRoots.test(p));
  if (moved.length === 0) return undefined;
  const alt = moved.sort((a, b) => b.length - a.length).map((p) => p.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')).join('|');
  return new RegExp(`(?<![\\w/.-])(${alt})(?![\\w/-])`, 'g');
}

export function rewriteSource(oldPath: string, newPath: string, text: string, mover: Mover, filePattern: RegExp | undefined): { text: string; notes: Note[] } {
  const kind = /\.(c|m)?jsx?$/.test(oldPath) ? ts.ScriptKind.JS : ts.ScriptKind.TS;
  const sf = ts.createSourceFile(oldPath, text, ts.ScriptTarget.Latest, true, kind);
  const edits: Edit[] = [];
  const notes: Note[] = [];
  const line = (pos: number) => sf.getLineAndCharacterOfPosition(pos).line + 1;
  const comments = new Map<number, number>();
  /** Full paths of moved files inside a message or a comment (`src/render/key.ts`). */
  const inText = (pos: number, end: number): void => {
    if (!filePattern) return;
    for (const m of text.slice(pos, end).matchAll(filePattern)) {
      const to = mover.file(m[1]);
      edits.push({ start: pos + m.index, end: pos + m.index + m[1].length, text: to });
      notes.push({ line: line(pos + m.index), from: m[1], to, kind: 'comment' });
    }
  };
  const visit = (node: ts.Node): void => {
    for (const c of ts.getLeadingCommentRanges(text, node.pos) ?? []) comments.set(c.pos, c.end);
    for (const c of ts.getTrailingCommentRanges(text, node.end) ?? []) comments.set(c.pos, c.end);
    if (ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node)) {
      const value = node.text;
      const start = node.getStart(sf) + 1;
      const end = node.getEnd() - 1;
      if (value.startsWith('./') || value.startsWith('../')) {
        const r = resolveRelative(oldPath, value, mover.tracked);
        const importLike = isModuleSpecifier(node);
        const pathLike = importLike || isFilePathString(node);
        if (r === undefined) {
          if (importLike) notes.push({ line: line(start), from: value, to: value, kind: 'unresolved' });
        } else {
          const next = respell(newPath, r, mover, value);
          if (next !== value && !pathLike) notes.push({ line: line(start), from: value, to: next, kind: 'left' });
          else if (next !== value) {
            edits.push({ start, end, text: next });
            notes.push({ line: line(start), from: value, to: next, kind: importLike ? 'import' : 'string' });
          }
        }
      } else {
        const next = respellRepoPath(value, mover);
        if (next !== undefined) {
          edits.push({ start, end, text: next });
          notes.push({ line: line(start), from: value, to: next, kind: 'repo-path' });
        } else inText(node.getStart(sf), node.getEnd());
      }
    } else if (ts.isTemplateHead(node) || ts.isTemplateMiddle(node) || ts.isTemplateTail(node)) {
      inText(node.getStart(sf), node.getEnd());
    }
    ts.forEachChild(node, visit);
  };
  visit(sf);
  for (const c of ts.getLeadingCommentRanges(text, sf.endOfFileToken.pos) ?? []) comments.set(c.pos, c.end);
  for (const [pos, end] of comments) inText(pos, end);
  return { text: applyEdits(text, edits), notes };
}

export function applyEdits(text: string, edits: Edit[]): string {
  const sorted = [...edits].sort((a, b) => b.start - a.start);
  let out = text;
  let limit = Infinity;
  for (const e of sorted) {
    if (e.end > limit) throw new Error(`overlapping edits at ${e.start}`);
    out = out.slice(0, e.start) + e.text + out.slice(e.end);
    limit = e.start;
  }
  return out;
}
