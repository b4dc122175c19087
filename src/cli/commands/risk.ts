/**
 * `foldwise risk <file> --width …`: the alias-risk report of one rendition, before rendering
 * it: a readable table, or `--json`. The analysis is the one the service and the ingest
 * ladder use (one spectrum of the source, the render service's own plan).
 */
import { basename, dirname, resolve } from 'node:path';
import type { Command } from 'commander';
import { addRenditionFlags, oneFileSettings, rawQueryOf, type RenditionFlags } from '../rendition-flags.js';

interface RiskOptions extends RenditionFlags {
  json?: boolean;
}

export function registerRisk(program: Command): void {
  addRenditionFlags(
    program
      .command('risk')
      .description('how likely a rendition is to alias, and where, before rendering it')
      .argument('<file>', 'source image'),
  )
    .option('--json', 'print the report as JSON')
    .addHelpText('after', '\nExample:\n  foldwise risk demo/images/fabrics/herringbone.jpg --width 640')
    .action(async (file: string, o: RiskOptions) => {
      const raw = rawQueryOf(o);
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { assessOne } = await import('../risk-report.js');
      const { withApp } = await import('../app.js');
      const { riskTable } = await import('../risk-table.js');
      const source = resolve(file);
      const view = await withApp(oneFileSettings(dirname(source)), (opened) => assessOne(opened, basename(source), raw));
      process.stdout.write(o.json ? `${JSON.stringify(view, null, 2)}\n` : riskTable(view));
    });
}
