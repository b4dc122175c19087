/**
 * `foldwise risk <file> --width …`: the alias-risk report of one rendition, before rendering
 * it: a readable table, or `--json` (the API's JSON), and `--map out.png` (the API's heat map).
 */
import { basename, dirname, resolve } from 'node:path';
import type { Command } from 'commander';
import { addRenditionFlags, oneFileSettings, rawQueryOf, type RenditionFlags } from '../rendition-flags.js';

type RiskOptions = RenditionFlags & { json?: boolean; map?: string };

export function registerRisk(program: Command): void {
  addRenditionFlags(
    program
      .command('risk')
      .description('how likely a rendition is to alias, and where, before rendering it')
      .argument('<file>', 'source image'),
  )
    .option('--json', 'print the report as JSON (as GET /v1/alias-risk answers it)')
    .option('--map <out.png>', 'also write the per-region heat map over the picture')
    .addHelpText('after', '\nExample:\n  foldwise risk demo/images/fabrics/herringbone.jpg --width 640 --map herringbone-640-risk.png')
    .action(async (file: string, o: RiskOptions) => {
      const raw = rawQueryOf(o);
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { fetchRisk, riskView } = await import('../risk-report.js');
      const { withApp } = await import('../app.js');
      const { riskTable } = await import('../risk-table.js');
      const source = resolve(file);
      const body = await withApp(oneFileSettings(dirname(source)), (opened) => fetchRisk(opened, basename(source), raw, o.map));
      process.stdout.write(o.json ? `${JSON.stringify(body, null, 2)}\n` : riskTable(riskView(body)));
      if (o.map) process.stderr.write(`wrote ${o.map}\n`);
    });
}
