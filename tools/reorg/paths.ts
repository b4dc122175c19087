/**
 * Where every tracked file goes: the move map first, then the folder rules (longest old folder
 * wins) for files the map does not list (added after it was written), else the file stays.
 * Paths are POSIX and relative to the repository root.
 */
import { posix } from 'node:path';

export interface MoveMap {
  folders: Record<string, string>;
  files: Record<string, string>;
}

export interface Mover {
  /** The new path of a tracked file (itself when it stays). */
  file(path: string): string;
  /** The new path of a folder: its rule, or the one place all its files move to, else itself. */
  folder(dir: string): string;
  /** Tracked files under src/ or test/ that the map does not list, with where the rules put them. */
  readonly unlisted: ReadonlyMap<string, string>;
  /** Files the map lists that are not tracked any more. */
  readonly gone: readonly string[];
  /** Every tracked file. */
  readonly tracked: ReadonlySet<string>;
}

const mapped = (roots: readonly string[]) => (p: string) => roots.some((r) => p.startsWith(r + '/'));

export function makeMover(map: MoveMap, trackedFiles: readonly string[]): Mover {
  const tracked = new Set(trackedFiles);
  const rules = Object.keys(map.folders).sort((a, b) => b.length - a.length);
  const byRule = (p: string): string => {
    const dir = posix.dirname(p);
    const rule = rules.find((r) => dir === r || dir.startsWith(r + '/'));
    return rule === undefined ? p : map.folders[rule] + p.slice(rule.length);
  };
  const inScope = mapped(['src', 'test']);
  const unlisted = new Map<string, string>();
  for (const p of trackedFiles) if (inScope(p) && !(p in map.files)) unlisted.set(p, byRule(p));
  const gone = Object.keys(map.files).filter((p) => !tracked.has(p));
  const file = (p: string): string => (p in map.files && tracked.has(p) ? map.files[p] : (unlisted.get(p) ?? p));
  const folderCache = new Map<string, string>();
  const folder = (dir: string): string => {
    const d = dir.replace(/\/+$/, '');
    const hit = folderCache.get(d);
    if (hit !== undefined) return hit;
    const rule = rules.find((r) => d === r || d.startsWith(r + '/'));
    let result = rule === undefined ? d : map.folders[rule] + d.slice(rule.length);
    if (rule === undefined) {
      const under = trackedFiles.filter((p) => p.startsWith(d + '/'));
      const places = new Set(under.map((p) => {
        const to = file(p);
        const rest = p.slice(d.length);
        return to.endsWith(rest) ? to.slice(0, to.length - rest.length) : '?';
      }));
      if (places.size === 1 && !places.has('?')) result = [...places][0];
    }
    folderCache.set(d, result);
    return result;
  };
  return { file, folder, unlisted, gone, tracked };
}

export interface Resolved {
  kind: 'file' | 'folder';
  /** The tracked file or folder the specifier names (old path). */
  path: string;
  /** How the specifier spells it: as is, `.js` for `.ts`, without extension, or a folder's index. */
  spelling: 'exact' | 'js-for-ts' | 'bare' | 'bare-index';
}

const folderSets = new WeakMap<ReadonlySet<string>, Set<string>>();

/** Every folder that holds a tracked file, at any depth. */
export function foldersOf(tracked: ReadonlySet<string>): Set<string> {
  let set = folderSets.get(tracked);
  if (set === undefined) {
    set = new Set();
    for (const t of tracked) for (let d = posix.dirname(t); d !== '.' && !set.has(d); d = posix.dirname(d)) set.add(d);
    folderSets.set(tracked, set);
  }
  return set;
}

/** What a relative specifier written in `from` names among the tracked files, if anything. */
export function resolveRelative(from: string, spec: string, tracked: ReadonlySet<string>): Resolved | undefined {
  const base = posix.normalize(posix.join(posix.dirname(from), spec)).replace(/(.)\/+$/, '$1');
  if (base.startsWith('../') || base === '..') return undefined;
  const isFolder = (p: string) => p === '.' || foldersOf(tracked).has(p);
  if (spec.endsWith('/')) return isFolder(base) ? { kind: 'folder', path: base, spelling: 'exact' } : undefined;
  if (tracked.has(base)) return { kind: 'file', path: base, spelling: 'exact' };
  const ts = base.replace(/\.js$/, '.ts').replace(/\.mjs$/, '.mts').replace(/\.jsx$/, '.tsx');
  if (ts !== base && tracked.has(ts)) return { kind: 'file', path: ts, spelling: 'js-for-ts' };
  if (tracked.has(base + '.ts')) return { kind: 'file', path: base + '.ts', spelling: 'bare' };
  if (tracked.has(base + '/index.ts')) return { kind: 'file', path: base + '/index.ts', spelling: 'bare-index' };
  if (isFolder(base)) return { kind: 'folder', path: base, spelling: 'exact' };
  return undefined;
}

/** The specifier that names the moved target from the moved file, spelt the way the old one was. */
export function respell(newFrom: string, r: Resolved, mover: Mover, oldSpec: string): string {
  let target = r.kind === 'file' ? mover.file(r.path) : mover.folder(r.path);
  if (r.kind === 'file') {
    if (r.spelling === 'js-for-ts') target = target.replace(/\.ts$/, '.js').replace(/\.mts$/, '.mjs').replace(/\.tsx$/, '.jsx');
    if (r.spelling === 'bare') target = target.replace(/\.ts$/, '');
    if (r.spelling === 'bare-index') target = target.endsWith('/index.ts') ? target.slice(0, -'/index.ts'.length) : target.replace(/\.ts$/, '');
  }
  let rel = posix.relative(posix.dirname(newFrom), target) || '.';
  if (!rel.startsWith('.')) rel = './' + rel;
  if (oldSpec.endsWith('/') && !rel.endsWith('/')) rel += '/';
  return rel;
}
