/**
 * `foldwise render <file> --width … -o <out>`: one rendition through the same pipeline as the
 * service (plan, prefilter, linear light, workers, encoder), in-process, no server, no cache.
 */
import { writeFile } from 'node:fs/promises';
import { basename, dirname, extname, resolve } from 'node:path';
import type { Command } from 'commander';
import { UsageError } from '../exit.js';
import { addRenditionFlags, oneFileSettings, parseRenditionQuery, rawQueryOf, type RenditionFlags } from '../rendition-flags.js';

const byExtension: Record<string, string> = { '.jpg': 'jpeg', '.jpeg': 'jpeg', '.png': 'png', '.webp': 'webp', '.avif': 'avif' };

type RenderOptions = RenditionFlags & { output: string };

export function registerRender(program: Command): void {
  addRenditionFlags(
    program
      .command('render')
      .description('render one rendition of an image file, in-process')
      .argument('<file>', 'source image (jpeg, png, webp, avif, gif, tiff)'),
  )
    .requiredOption('-o, --output <file>', 'where to write the rendition')
    .addHelpText('after', '\nWithout --format the format follows the -o extension.\n\nExample:\n  foldwise render demo/images/fabrics/twill.jpg --width 640 -o twill-640.webp')
    .action(async (file: string, o: RenderOptions) => {
      const format = o.format ?? byExtension[extname(o.output).toLowerCase()];
      const raw = rawQueryOf(o, { format });
      if (!format) throw new UsageError(`cannot tell the format from "${o.output}": add --format`);
      const source = resolve(file);
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { withApp } = await import('../app.js');
      const { renderRendition } = await import('../../rendition/service.js');
      await withApp(oneFileSettings(dirname(source)), async ({ app, config }) => {
        const query = await parseRenditionQuery(config, raw);
        const r = await renderRendition(app.renderContext, basename(source), query);
        await writeFile(o.output, r.entry.body);
        const plan = r.entry.headers['rendition-plan'] ?? '';
        process.stdout.write(`wrote ${o.output} (${format}, ${r.entry.body.length} bytes)\nplan: ${plan}\n`);
      });
    });
}
