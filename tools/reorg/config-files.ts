/**
 * Paths outside the code: in the build and CI files (package.json scripts, tsconfig includes,
 * the Dockerfile, .ci/run) every path token that is a moved file or folder is respelt; in the
 * Markdown documents only full paths of moved files (`src/render/key.ts`), since prose about a
 * folder ("src/render holds…") needs a person.
 */
import type { Mover } from './paths.js';
import type { Note } from './rewrite.js';
import { respellRepoPath } from './rewrite.js';

export const configFiles = ['package.json', 'tsconfig.json', 'tsconfig.build.json', 'src/inspector/tsconfig.json', 'Dockerfile', '.ci/run'];

const token = /(?<![\w/.-])((?:src|test|scripts|load|bin|tools)\/[\w./*{},-]*[\w*}])/g;

export function rewriteConfigText(text: string, mover: Mover): { text: string; notes: Note[] } {
  const notes: Note[] = [];
  const lines = text.split('\n').map((l, i) =>
    l.replace(token, (m: string) => {
      const to = respellRepoPath(m, mover);
      if (to === undefined) return m;
      notes.push({ line: i + 1, from: m, to, kind: 'repo-path' });
      return to;
    }),
  );
  return { text: lines.join('\n'), notes };
}

export function rewriteMarkdown(text: string, mover: Mover, filePattern: RegExp | undefined): { text: string; notes: Note[] } {
  if (!filePattern) return { text, notes: [] };
  const notes: Note[] = [];
  const lines = text.split('\n').map((l, i) =>
    l.replace(filePattern, (m: string) => {
      const to = mover.file(m);
      notes.push({ line: i + 1, from: m, to, kind: 'comment' });
      return to;
    }),
  );
  return { text: lines.join('\n'), notes };
}
