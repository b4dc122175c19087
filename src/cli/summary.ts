/** The summary `foldwise warm` prints: one aligned line per figure. */

export interface WarmTally {
  files: number;
  /** Renditions rendered now. */
  done: number;
  /** Renditions found in the cache already. */
  skipped: number;
  failed: Array<{ path: string; reason: string }>;
  /** Bytes of the renditions rendered now. */
  bytes: number;
  /** Alias-risk warnings over all files. */
  warnings: number;
  ms: number;
  /** Where the renditions went, for people. */
  cache?: string;
}

function size(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MiB`;
}

export function summaryTable(t: WarmTally): string {
  const rows: Array<[string, string]> = [
    ['files', String(t.files)],
    ['done', `${t.done} renditions rendered`],
    ['skipped', `${t.skipped} already cached`],
    ['failed', `${t.failed.length} files`],
    ['bytes', size(t.bytes)],
    ['time', `${(t.ms / 1000).toFixed(1)} s`],
    ['warnings', `${t.warnings} alias-risk warnings (see foldwise risk)`],
  ];
  if (t.cache) rows.push(['cache', t.cache]);
  const lines = rows.map(([k, v]) => `  ${k.padEnd(9)}${v}`);
  for (const f of t.failed) lines.push(`  ! ${f.path}: ${f.reason}`);
  return `${lines.join('\n')}\n`;
}
