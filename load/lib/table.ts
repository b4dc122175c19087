/** Prints rows as an aligned text table (the load scripts' output format). */
export function printTable(title: string, header: string[], rows: Array<Array<string | number>>): void {
  const cells = [header, ...rows.map((r) => r.map((c) => (typeof c === 'number' ? fmt(c) : c)))];
  const widths = header.map((_, i) => Math.max(...cells.map((r) => String(r[i] ?? '').length)));
  const line = (r: Array<string | number>) =>
    r.map((c, i) => (i === 0 ? String(c).padEnd(widths[i]) : String(c).padStart(widths[i]))).join('  ');
  console.log(`\n${title}`);
  console.log(line(header));
  console.log(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const r of cells.slice(1)) console.log(line(r));
}

function fmt(n: number): string {
  if (Number.isInteger(n)) return String(n);
  return Math.abs(n) >= 100 ? n.toFixed(0) : n.toFixed(2);
}

export const mib = (bytes: number): number => bytes / 2 ** 20;
