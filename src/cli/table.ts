/**
 * A plain text table for the terminal: a header row, a rule, the rows, and an optional total
 * row under a second rule. Columns are as wide as their widest cell; numbers align right.
 */
export interface Column {
  title: string;
  align?: 'left' | 'right';
}

export function textTable(columns: Column[], rows: string[][], total?: string[]): string {
  const all = total ? [...rows, total] : rows;
  const widths = columns.map((c, i) => Math.max(c.title.length, ...all.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]) =>
    columns
      .map((c, i) => (c.align === 'right' ? (cells[i] ?? '').padStart(widths[i]) : (cells[i] ?? '').padEnd(widths[i])))
      .join('  ')
      .trimEnd();
  const rule = widths.map((w) => '-'.repeat(w)).join('  ');
  const out = [line(columns.map((c) => c.title)), rule, ...rows.map(line)];
  if (total) out.push(rule, line(total));
  return out.map((l) => `  ${l}`).join('\n');
}
