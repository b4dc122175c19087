import type { Limits } from '../config.js';
import { FoldwiseError } from '../errors.js';
import { sourceFormats } from '../codec/formats.js';
import type { Origin } from '../origins/types.js';
import type { RenderContext } from '../rendition/service.js';
import { ladderWish, type LoadedSource, loadSource } from '../rendition/source.js';
import { StageClock } from '../rendition/timings.js';

/** Decodes the uploaded bytes with the rendition path's own loader (same limits). */
export function decodeUpload(render: RenderContext, limits: Limits, bytes: Buffer, digest: string): Promise<LoadedSource> {
  const identity = { key: `upload/${digest}`, version: digest };
  const upload: Origin = {
    name: 'upload',
    read: async () => ({ identity, bytes }),
    identify: async () => identity,
  };
  // Observed as the render path's `decode` stage (/metrics counts an upload's decodes).
  return loadSource(upload, identity.key, limits, new StageClock(render.observe), undefined, ladderWish);
}

/** The file extension a decoded format is stored under (the origin lists by extension). */
export function extensionOf(format: string): string {
  const found = (sourceFormats[format] ?? (format === 'avif' ? sourceFormats.heif : undefined))?.extensions[0];
  if (!found) throw new FoldwiseError('ERR_SOURCE_UNSUPPORTED', `uploads of ${format} images are not accepted`);
  return found;
}
