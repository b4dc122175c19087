/**
 * The main thread's side of the warm start: one rendition of a picture generated here, through
 * the real render path (renderRendition: admission, the spooled decode, the render and the new
 * source's analysis in the pool, the encode, a cache store), with an origin, cache and spectrum
 * store of its own, so nothing of it reaches the service's cache, index or metrics. The first
 * request then finds that path's code compiled and libvips' buffers made for a picture of this
 * class, instead of paying for them.
 */
import type { FastifyInstance } from 'fastify';
import { MemoryTier } from '../cache/memory.js';
import { TieredCache } from '../cache/tiered.js';
import type { CacheEntry } from '../cache/types.js';
import { encodeImage } from '../codec/encode.js';
import { kernelNames } from '../core/index.js';
import { SingleFlight } from '../lib/single-flight.js';
import type { Origin, SourceIdentity } from '../origins/types.js';
import { renderRendition } from '../rendition/service.js';
import { adaptivePrefilter } from '../risk/service.js';
import { SpectrumStore } from '../risk/spectrum-store.js';
import { compileRenditionQuery } from '../schemas/rendition.js';

/** Just above the streamed path's threshold (rendition/streamed.ts: 1 MP). */
const WIDTH = 1280;
const HEIGHT = 832;

/** Woven-looking stripes in colour, as the demo's fabrics (a code-made picture). */
function picture(): Uint8Array {
  const data = new Uint8Array(WIDTH * HEIGHT * 3);
  for (let y = 0; y < HEIGHT; y++) {
    for (let x = 0; x < WIDTH; x++) {
      const i = (y * WIDTH + x) * 3;
      const warp = Math.cos(2 * Math.PI * 0.21 * x);
      const weft = Math.cos(2 * Math.PI * 0.13 * y);
      data[i] = Math.round(140 + 60 * warp);
      data[i + 1] = Math.round(110 + 50 * weft);
      data[i + 2] = Math.round(90 + 40 * warp * weft);
    }
  }
  return data;
}

/** Renders the generated picture twice (a new source, then a further width); never throws. */
export async function warmRenderPath(app: FastifyInstance): Promise<boolean> {
  try {
    const raster = { data: picture(), width: WIDTH, height: HEIGHT, channels: 3 as const };
    const bytes = await encodeImage(raster, { format: 'jpeg', quality: 90, background: { r: 255, g: 255, b: 255 } });
    const identity: SourceIdentity = { key: 'warm-start.jpg', version: 'warm' };
    const origin: Origin = { name: 'warm', read: async () => ({ identity, bytes }), identify: async () => identity };
    const spectra = new SpectrumStore({ maxBytes: 2 ** 20 });
    const ctx = {
      origin,
      cache: new TieredCache([new MemoryTier(2 ** 22)]),
      flight: new SingleFlight<CacheEntry>(),
      pool: app.renderPool,
      limits: app.config.limits,
      adaptive: adaptivePrefilter(spectra, app.renderPool),
    };
    const query = compileRenditionQuery({ maxDimension: app.config.limits.maxDimension, kernelNames });
    for (const width of ['400', '300']) await renderRendition(ctx, identity.key, query.parse({ width, format: 'jpeg' }));
    return true;
  } catch (err) {
    app.log.warn({ err }, 'the warm-up render failed');
    return false;
  }
}
