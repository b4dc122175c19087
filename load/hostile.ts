/**
 * Hostile load (issue 18): each scenario against a FRESH service in its own process on
 * 127.0.0.1, with its own copy of the sources, cache and /dev/shm spool folder. For each it
 * prints peak RSS + spool bytes, status counts, the share of cache hits served during the miss
 * flood, responses without a status, corrupt bodies served, and the seconds until /readyz is
 * 200 and a normal miss renders again; then one table against the targets.
 *   npm run load:hostile -- [--flood-seconds 5] [--only a,c] [--client-timeout 40]
 *                           [--recovery-cap 60] [--cap-gib 10]
 * Bounded: every request has a client timeout, floods a fixed length, recovery a cap, and a
 * server whose RSS + spool passes --cap-gib is killed (reported as "killed at cap").
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import { startDripUpstream } from './lib/drip-upstream.js';
import { recovery, startHostile } from './lib/hostile-server.js';
import { scenarios } from './lib/hostile-scenarios.js';
import { freshSourceDir, makeHostileSources } from './lib/hostile-sources.js';
import { mib, printTable } from './lib/table.js';

const { values } = parseArgs({
  options: {
    'flood-seconds': { type: 'string', default: '5' },
    only: { type: 'string' },
    'client-timeout': { type: 'string', default: '40' },
    'recovery-cap': { type: 'string', default: '60' },
    'cap-gib': { type: 'string', default: '10' },
  },
});
const floodSeconds = Math.min(60, Number(values['flood-seconds']));
const clientTimeoutMs = Math.min(120, Number(values['client-timeout'])) * 1000;
const recoveryCap = Math.min(300, Number(values['recovery-cap']));
const capBytes = Number(values['cap-gib']) * 2 ** 30;
const only = values.only?.split(',');
const PEAK_TARGET = 1.5 * 2 ** 30;
const RECOVERY_TARGET = 10;

console.log('making the hostile sources (kept in the temp folder after the first run)...');
const src = await makeHostileSources();
const drip = await startDripUpstream(readFileSync(join(src.dir, src.small)), 12);

interface Row {
  id: string;
  peak: number;
  capped: boolean;
  statuses: string;
  hitShare?: number;
  noStatus: number;
  corrupt: number;
  recovery: number;
}
const rows: Row[] = [];
try {
  for (const s of scenarios.filter((x) => !only || only.includes(x.id))) {
    const sourceDir = freshSourceDir(src);
    const server = await startHostile(sourceDir, s.config?.({ dripBase: drip.base }) ?? {}, capBytes);
    try {
      console.log(`\n(${s.id}) ${s.title} [server log: ${server.logFile}]`);
      const result = await s.run({ url: server.url, sourceDir, src, floodSeconds, clientTimeoutMs, dripBase: drip.base });
      const secs = await recovery(server, src.small, recoveryCap);
      const { bytes, capped } = server.peak();
      const noStatus = [...result.tally.counts].filter(([k]) => k.endsWith('none')).reduce((n, [, v]) => n + v, 0);
      const row: Row = {
        id: s.id, peak: bytes, capped, statuses: result.tally.toString(), hitShare: result.hitShare,
        noStatus, corrupt: result.corruptServed ?? 0, recovery: secs,
      };
      rows.push(row);
      console.log(`  statuses ${row.statuses}${result.note ? `; ${result.note}` : ''}`);
      console.log(`  peak RSS+spool ${mib(bytes).toFixed(0)} MiB${capped ? ' (killed at cap)' : ''}; recovery ${fmtSecs(secs)}`);
    } finally {
      await server.dispose();
    }
  }
} finally {
  await drip.close();
}

function fmtSecs(s: number): string {
  return Number.isFinite(s) ? `${s.toFixed(1)} s` : `> ${recoveryCap} s`;
}
const pass = (ok: boolean) => (ok ? 'yes' : 'NO');
const tableRows = rows.map((r) => {
  const ok = r.peak <= PEAK_TARGET && !r.capped && r.recovery <= RECOVERY_TARGET && r.noStatus === 0 && r.corrupt === 0 &&
    (r.hitShare === undefined || r.hitShare >= 0.99);
  return [
    r.id, `${mib(r.peak).toFixed(0)}${r.capped ? ' (cap)' : ''}`, r.statuses,
    r.hitShare === undefined ? '-' : `${(100 * r.hitShare).toFixed(1)} %`, r.noStatus, r.corrupt,
    Number.isFinite(r.recovery) ? r.recovery.toFixed(1) : `> ${recoveryCap}`, pass(ok),
  ];
});
const header = ['scenario', 'peak RSS+spool MiB', 'statuses', 'hits 200 in flood', 'no status', 'corrupt served', 'recovery s', 'targets met'];
printTable(
  `hostile load (flood ${floodSeconds} s, client timeout ${clientTimeoutMs / 1000} s, recovery cap ${recoveryCap} s)`,
  header,
  tableRows,
);
console.log('targets: peak RSS+spool <= 1536 MiB; recovery <= 10 s; >= 99 % hits served in the flood; 0 without status; 0 corrupt served');
// The same table in Markdown, for the README's Reliability section.
console.log(`\n| ${header.join(' | ')} |\n|${header.map(() => '---').join('|')}|`);
for (const r of tableRows) console.log(`| ${r.map((c) => String(c).replace(/\|/g, '/')).join(' | ')} |`);
