/**
 * `foldwise render <file> --width … -o <out>`: one rendition through the same pipeline as the
 * service (plan, prefilter, linear light, workers, encoder), in-process, no server, no cache.
 */
import { writeFile } from 'node:fs/promises';
import { basename, dirname, extname, resolve } from 'node:path';
import { type Command, Option } from 'commander';
import { UsageError } from '../exit.js';
import { positiveInt } from '../options.js';

const byExtension: Record<string, string> = { '.jpg': 'jpeg', '.jpeg': 'jpeg', '.png': 'png', '.webp': 'webp', '.avif': 'avif' };

interface RenderOptions {
  width?: number;
  height?: number;
  fit?: string;
  format?: string;
  quality?: number;
  kernel?: string;
  prefilter?: string;
  output: string;
}

export function registerRender(program: Command): void {
  program
    .command('render')
    .description('render one rendition of an image file, in-process')
    .argument('<file>', 'source image (jpeg, png, webp, avif, gif, tiff)')
    .option('--width <px>', 'target width', positiveInt())
    .option('--height <px>', 'target height', positiveInt())
    .option('--fit <mode>', 'CSS object-fit when both sides are given: contain, cover, fill, scale-down')
    .addOption(new Option('--format <format>', 'output format (default: from the -o extension)').choices(['jpeg', 'png', 'webp', 'avif']))
    .option('--quality <1-100>', 'encoder quality', positiveInt(100))
    .option('--kernel <name>', 'reconstruction kernel (default auto)')
    .option('--prefilter <auto|none|sigma>', 'Gaussian prefilter (default auto)')
    .requiredOption('-o, --output <file>', 'where to write the rendition')
    .addHelpText('after', '\nExample:\n  foldwise render demo/images/fabrics/twill.jpg --width 640 -o twill-640.webp')
    .action(async (file: string, o: RenderOptions) => {
      if (o.width === undefined && o.height === undefined) throw new UsageError('give --width, --height, or both');
      const format = o.format ?? byExtension[extname(o.output).toLowerCase()];
      if (!format) throw new UsageError(`cannot tell the format from "${o.output}": add --format`);
      const source = resolve(file);
      const raw: Record<string, string> = { format };
      for (const key of ['width', 'height', 'fit', 'quality', 'kernel', 'prefilter'] as const) {
        if (o[key] !== undefined) raw[key] = String(o[key]);
      }
      // Loaded here, not at start, so `foldwise --help` stays quick.
      const { asUsage, withApp } = await import('../app.js');
      const { compileRenditionQuery } = await import('../../schemas/rendition.js');
      const { kernelNames } = await import('../../core/index.js');
      const { renderRendition } = await import('../../render/service.js');
      await withApp(
        (config) => {
          config.origin.sourceDir = dirname(source);
          config.cache = { ...config.cache, memoryBytes: 0, diskBytes: 0, redisUrl: null };
        },
        async ({ app, config }) => {
          let query;
          try {
            query = compileRenditionQuery({ maxDimension: config.limits.maxDimension, kernelNames }).parse(raw);
          } catch (e) {
            throw asUsage(e);
          }
          const r = await renderRendition(app.renderContext, basename(source), query);
          await writeFile(o.output, r.entry.body);
          const plan = r.entry.headers['rendition-plan'] ?? '';
          process.stdout.write(`wrote ${o.output} (${format}, ${r.entry.body.length} bytes)\nplan: ${plan}\n`);
        },
      );
    });
}
