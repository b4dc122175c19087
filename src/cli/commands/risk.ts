/**
 * `foldwise risk <file> --width …`: the alias-risk report of one rendition, before rendering
 * it: a readable table, or `--json`. The analysis is the one the service and the ingest
 * ladder use (one spectrum of the source, the render service's own plan).
 */
import { basename, dirname, resolve } from 'node:path';
import type { Command } from 'commander';
import { UsageError } from '../exit.js';
import { positiveInt } from '../options.js';

interface RiskOptions {
  width?: number;
  height?: number;
  fit?: string;
  kernel?: string;
  prefilter?: string;
  json?: boolean;
}

export function registerRisk(program: Command): void {
  program
    .command('risk')
    .description('how likely a rendition is to alias, and where, before rendering it')
    .argument('<file>', 'source image')
    .option('--width <px>', 'target width', positiveInt())
    .option('--height <px>', 'target height', positiveInt())
    .option('--fit <mode>', 'CSS object-fit when both sides are given')
    .option('--kernel <name>', 'reconstruction kernel (default auto)')
    .option('--prefilter <auto|none|sigma>', 'Gaussian prefilter (default auto)')
    .option('--json', 'print the report as JSON')
    .addHelpText('after', '\nExample:\n  foldwise risk demo/images/fabrics/herringbone.jpg --width 640')
    .action(async (file: string, o: RiskOptions) => {
      if (o.width === undefined && o.height === undefined) throw new UsageError('give --width, --height, or both');
      const raw: Record<string, string> = {};
      for (const key of ['width', 'height', 'fit', 'kernel', 'prefilter'] as const) {
        if (o[key] !== undefined) raw[key] = String(o[key]);
      }
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { assessOne } = await import('../risk-report.js');
      const { withApp } = await import('../app.js');
      const { riskTable } = await import('../risk-table.js');
      const source = resolve(file);
      const view = await withApp(
        (config) => {
          config.origin.sourceDir = dirname(source);
          config.cache = { ...config.cache, memoryBytes: 0, diskBytes: 0, redisUrl: null };
        },
        (opened) => assessOne(opened, basename(source), raw),
      );
      process.stdout.write(o.json ? `${JSON.stringify(view, null, 2)}\n` : riskTable(view));
    });
}
