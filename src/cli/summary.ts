/** The summary `foldwise warm` prints: a table with one row per file and a total row. */
import { textTable } from './table.js';

/** One file's outcome. */
export interface WarmRow {
  path: string;
  /** Renditions rendered now. */
  rendered: number;
  /** Renditions found in the cache already. */
  cached: number;
  /** Bytes of the renditions rendered now. */
  bytes: number;
  /** Alias-risk warnings of the file's ladder. */
  warnings: number;
  /** Why the file failed, when it did. */
  error?: string;
}

export interface WarmTally {
  rows: WarmRow[];
  ms: number;
  /** Where the renditions went, for people. */
  cache?: string;
}

function size(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MiB`;
}

export const failedCount = (t: WarmTally) => t.rows.filter((r) => r.error !== undefined).length;

export function summaryTable(t: WarmTally): string {
  const columns = [
    { title: 'file' },
    { title: 'rendered', align: 'right' as const },
    { title: 'cached', align: 'right' as const },
    { title: 'bytes', align: 'right' as const },
    { title: 'warnings', align: 'right' as const },
    { title: 'result' },
  ];
  const rows = t.rows.map((r) => [r.path, String(r.rendered), String(r.cached), size(r.bytes), String(r.warnings), r.error === undefined ? 'ok' : `failed: ${r.error}`]);
  const sum = (key: 'rendered' | 'cached' | 'bytes' | 'warnings') => t.rows.reduce((s, r) => s + r[key], 0);
  const failed = failedCount(t);
  const total = [
    `${t.rows.length} files`,
    String(sum('rendered')),
    String(sum('cached')),
    size(sum('bytes')),
    String(sum('warnings')),
    `${t.rows.length - failed} ok, ${failed} failed, ${(t.ms / 1000).toFixed(1)} s`,
  ];
  const notes = [`  rendered: made now; cached: found in the cache; warnings: alias-risk warnings (see foldwise risk)`];
  if (t.cache) notes.push(`  cache: ${t.cache}`);
  return `${textTable(columns, rows, total)}\n${notes.join('\n')}\n`;
}
