import type { EventEmitter } from 'node:events';
import type { Config } from '../config.js';
import { frameOf } from '../core/index.js';
import { renderRendition, type RenderContext } from '../rendition/service.js';
import type { LoadedSource } from '../rendition/source.js';
import type { SpectrumStore } from '../risk/spectrum-store.js';
import type { IngestFormat } from '../schemas/ingest.js';
import type { compileRenditionQuery } from '../schemas/rendition.js';
import { assessLadder } from '../risk/ladder.js';
import { mapBounded } from '../lib/bounded.js';
import { ladderFor } from './ladder.js';
import { assembleManifest, type Manifest, type ManifestRendition } from './manifest.js';
import { makePlaceholder } from './placeholder.js';
import { renditionUrl } from './urls.js';
import { writeWarnings } from '../risk/warnings.js';
import type { IngestOptions, RenditionEvent } from './work.js';

/** What building a manifest needs of the ingest service; `events` hears 'analysed' and 'rendition'. */
export interface BuildContext {
  config: Config;
  render: RenderContext;
  spectra: SpectrumStore;
  query: ReturnType<typeof compileRenditionQuery>;
  events: EventEmitter;
}

/**
 * The manifest of a decoded source: its alias risk analysed once, then every rung of the
 * ladder rendered into the cache from the same pixels, `concurrency` at a time.
 */
export async function buildManifest(ctx: BuildContext, sourceKey: string, loaded: LoadedSource, options: IngestOptions, concurrency: number): Promise<Manifest> {
  const { identity, decoded } = loaded;
  // An animation's ladder and risk are those of its first frame; its renditions stay animated.
  const frames = decoded.animation?.frames ?? 1;
  const raster = frames > 1 ? frameOf(decoded.raster, frames, 0) : decoded.raster;
  const formats = options.formats ?? ctx.config.ingest.formats;
  const widths = ladderFor(raster.width, options.widths);
  const extra = options.rendition ?? {};
  const queryFor = (width: number, format: IngestFormat) => ctx.query.parse({ width: String(width), format, ...extra });
  // The render path's spectrum store: analysed once per source version, and the renders'
  // content-adaptive prefilter below finds it there by identity.
  const before = ctx.spectra.analyses;
  const spectrum = await ctx.spectra.ofRaster(raster, identity);
  if (ctx.spectra.analyses > before) ctx.events.emit('analysed', sourceKey);
  const steps = assessLadder(
    spectrum,
    widths.map((width) => ({ width, query: queryFor(width, formats[0]) })),
    ctx.config.limits,
  );
  const tasks = steps.flatMap((step) => formats.map((format) => ({ step, format })));
  const renditions = await mapBounded(tasks, concurrency, async ({ step, format }): Promise<ManifestRendition> => {
    // The source decoded above serves every miss of the ladder (no decode per rendition),
    // within the ladder's lease.
    const r = await renderRendition({ ...ctx.render, decoded: loaded, admitted: true }, sourceKey, queryFor(step.width, format));
    ctx.events.emit('rendition', { source: sourceKey, width: step.width, format, cache: r.cache, bytes: r.entry.body.length } satisfies RenditionEvent);
    return {
      url: renditionUrl(sourceKey, step.width, format, ctx.config.signing.keys[0], extra, ctx.config.server.publicUrl),
      width: step.width,
      height: step.height,
      format,
      bytes: r.entry.body.length,
      etag: r.entry.etag,
      risk: { level: step.level, score: step.score },
    };
  });
  const placeholder = await makePlaceholder(ctx.render, sourceKey, loaded, (raw) => ctx.query.parse(raw));
  const source = { key: sourceKey, width: raster.width, height: raster.height, ...(frames > 1 ? { frames } : {}) };
  return assembleManifest(source, formats, renditions, writeWarnings(steps), { sizes: options.sizes, placeholder, transparent: loaded.decoded.hasAlpha });
}
