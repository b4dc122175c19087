/**
 * `foldwise warm <folder>`: pre-renders every image of a folder into the configured cache (the
 * disk tier, or Redis when configured) through the ingest service, so each file gets the same
 * ladder, formats and URLs a CMS upload would; shows a progress bar and prints a summary.
 */
import { resolve } from 'node:path';
import { SingleBar } from 'cli-progress';
import type { Command } from 'commander';
import type { RenditionEvent } from '../../ingest/service.js';
import type { IngestFormat } from '../../schemas/ingest.js';
import { UsageError } from '../exit.js';
import { widthList } from '../options.js';
import { failedCount, summaryTable, type WarmRow, type WarmTally } from '../summary.js';

interface WarmOptions {
  widths?: number[];
  formats?: string;
  progress: boolean;
}

async function parseFormats(text: string | undefined): Promise<IngestFormat[] | undefined> {
  if (text === undefined) return undefined;
  const { ingestFormats } = await import('../../schemas/ingest.js');
  const list = text.split(',').map((f) => f.trim());
  const bad = list.filter((f) => !(ingestFormats as readonly string[]).includes(f));
  if (bad.length > 0) throw new UsageError(`unknown format ${bad.join(', ')}: use ${ingestFormats.join(', ')}`);
  return list as IngestFormat[];
}

export function registerWarm(program: Command): void {
  program
    .command('warm')
    .description('pre-render every image of a folder into the configured cache')
    .argument('<folder>', 'folder of source images (searched recursively)')
    .option('--widths <list>', 'comma list of widths (default: the ingest ladder, capped per source)', widthList())
    .option('--formats <list>', 'comma list of formats (default: ingest.formats)')
    .option('--no-progress', 'no progress bar')
    .addHelpText('after', '\nExample:\n  foldwise warm demo/images --widths 320,640,1280')
    .action(async (folder: string, o: WarmOptions) => {
      const formats = await parseFormats(o.formats);
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { withApp } = await import('../app.js');
      const root = resolve(folder);
      const tally = await withApp(
        (config) => {
          config.origin.sourceDir = root;
        },
        async ({ app, config }) => {
          const files = (await app.origin.list?.()) ?? [];
          if (files.length === 0) throw new Error(`no images found under ${root}`);
          const t: WarmTally = { rows: [], ms: 0 };
          // The file being warmed: the ingest service reports each of its renditions.
          let row: WarmRow = { path: '', rendered: 0, cached: 0, bytes: 0, warnings: 0 };
          let renditions = 0;
          const onRendition = (e: RenditionEvent): void => {
            renditions++;
            if (e.cache === 'miss') {
              row.rendered++;
              row.bytes += e.bytes;
            } else row.cached++;
          };
          app.ingest.on('rendition', onRendition);
          const bar = new SingleBar({
            format: 'warm |{bar}| {value}/{total} files | {renditions} renditions | ETA {eta_formatted} | {file}',
            noTTYOutput: true,
            notTTYSchedule: 1000,
            hideCursor: true,
          });
          if (o.progress) bar.start(files.length, 0, { renditions: 0, file: '' });
          const start = performance.now();
          for (const file of files) {
            if (o.progress) bar.update({ file: file.path });
            row = { path: file.path, rendered: 0, cached: 0, bytes: 0, warnings: 0 };
            try {
              const work = await app.ingest.fromSource(file.path, { widths: o.widths, formats });
              row.warnings = (await app.ingest.run(work).value).warnings.length;
            } catch (e) {
              row.error = e instanceof Error ? e.message : String(e);
            }
            t.rows.push(row);
            if (o.progress) bar.increment({ renditions });
          }
          t.ms = performance.now() - start;
          if (o.progress) bar.stop();
          t.cache = config.cache.redisUrl ? 'redis' : `disk ${config.cache.dir}`;
          return t;
        },
      );
      process.stdout.write(summaryTable(tally));
      const failed = failedCount(tally);
      if (failed > 0) throw new Error(`${failed} of ${tally.rows.length} files failed`);
    });
}
